"""``python -m motorlib``: the same command group as the ``motorlib`` script."""

from motorlib.cli.main import main

if __name__ == "__main__":
    main()
