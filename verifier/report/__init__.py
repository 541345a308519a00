"""Stage 5: formatters over the results (text for terminals and editors, JSON)."""
