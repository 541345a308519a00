"""Stage 2: parse the text of one claim with the lark grammar into an AST."""
