"""The command line (click): main.py holds the group and error translation, one module per command."""
