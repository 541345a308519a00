"""Stage 3: give each parsed side its meaning (atoms, weight, level, E_2-depth)."""
