from calami.cli import main

raise SystemExit(main())
