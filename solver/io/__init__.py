"""The JSON project file: reading (field by field, with plain messages), writing and its schema."""
