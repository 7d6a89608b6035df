from corpusaudit.cli import main

raise SystemExit(main())
