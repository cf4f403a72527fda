"""The language server for `.qlc` specs (`logiccheck server`)."""
