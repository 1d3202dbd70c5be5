import sys

from gui.launch import main

sys.exit(main())
