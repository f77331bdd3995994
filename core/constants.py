"""Physical constants used throughout Mountsmith (SI)."""

#: Standard acceleration of gravity, m/s² (ISO 80000-3; CGPM 1901).
STANDARD_GRAVITY = 9.80665
