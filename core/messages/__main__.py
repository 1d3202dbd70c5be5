"""``python -m core.messages`` prints the README's table of messages (a test keeps it in step)."""

import sys

from .readme_table import markdown_table

sys.stdout.write(markdown_table())
