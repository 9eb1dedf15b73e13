"""``python -m motorlib``: the same command group as the ``motorlib`` script."""

from motorlib.cli.main import run

if __name__ == "__main__":
    run()
