"""Families of modular forms: each module builds exact q-expansions of one family."""
