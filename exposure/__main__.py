from exposure.cli import main

main()
