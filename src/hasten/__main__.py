"""``python -m hasten``: the same as the ``hasten`` console script."""

from .launch import main

main()
