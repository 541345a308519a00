"""``python -m verifier.schema``: print the README's table of report fields."""

from verifier.schema import readme_block

print(readme_block(), end="")
