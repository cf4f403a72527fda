from logiccheck.cli.main import main

main()
