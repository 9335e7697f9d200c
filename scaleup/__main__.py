from scaleup.cli import main

main()
