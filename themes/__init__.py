"""Site themes shipped with netfolio; each folder holds templates/ and static/."""
