"""Stage 4: compute exact q-expansions and decide each claim."""
