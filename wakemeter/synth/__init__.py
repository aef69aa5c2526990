"""Linear-theory wake renderer for tests and demo scenes. No Qt."""
