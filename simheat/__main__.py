"""Allow ``python -m simheat``."""

from simheat.cli import main

if __name__ == "__main__":
    main()
