from audit.cli import main
import sys
sys.exit(main())
