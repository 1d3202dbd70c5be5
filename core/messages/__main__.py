"""``python -m core.messages`` prints the README's table of messages (a test keeps it in step);
``python -m core.messages --readme`` writes it into README.md between its markers."""

import re
import sys
from pathlib import Path

from .readme_table import markdown_table

if sys.argv[1:] == ["--readme"]:
    readme = Path(__file__).resolve().parents[2] / "README.md"
    text = readme.read_text(encoding="utf-8")
    table = markdown_table()
    new = re.sub(r"(<!-- messages:start -->\n).*?(<!-- messages:end -->)",
                 lambda m: m.group(1) + table + m.group(2), text, count=1, flags=re.S)
    readme.write_text(new, encoding="utf-8")
else:
    sys.stdout.write(markdown_table())
