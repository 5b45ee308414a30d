"""Commands of the cyclewright CLI; each module exposes ``COMMANDS``."""
