"""The desktop program (PySide6).  The only package that imports Qt; it renders the document
model and calls the core for every number."""
