"""Reusable widgets: each shows one core object and says, by signal, what the user changed."""
