"""Safety cautions shown in the window, on every export and by the command line.

Kept in one place so every output says the same thing.
"""

#: One line for exported images and the status bar.
CAUTION_LINE = ("Preliminary values only: supplier data and seismic restraint govern; "
                "follow local codes and have a licensed engineer review the design.")

#: The full safety notes (Help menu, README, review sheets).
SAFETY_NOTES = (
    "Mountsmith gives preliminary, catalog-neutral values for early design. They are not a "
    "selection of a product and not a sign-off.",
    "The mount supplier's data (rated load, stiffness, damping, fatigue and temperature limits) "
    "governs the final choice; check every mount against it.",
    "A heavy machine on resilient mounts can shift, walk or fall in an earthquake, a short circuit, "
    "a start or a failure: seismic and wind restraint, snubbers and travel limits govern wherever "
    "they apply.",
    "Follow local building codes and standards; have a licensed engineer review the design before "
    "anything is built or installed.",
)
