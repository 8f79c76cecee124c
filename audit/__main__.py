import sys

from audit.cli import main

if __name__ == "__main__":  # not when a worker process imports this module
    sys.exit(main())
