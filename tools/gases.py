"""The gases pvhazard models, by its own names and CoolProp's: the one list the scripts in
tools/ share (add a gas here, then regenerate their outputs)."""

GASES = [
    ("air", "Air"),
    ("nitrogen", "Nitrogen"),
    ("oxygen", "Oxygen"),
    ("argon", "Argon"),
    ("helium", "Helium"),
    ("hydrogen", "Hydrogen"),
    ("methane", "Methane"),
    ("carbon-dioxide", "CarbonDioxide"),
]
