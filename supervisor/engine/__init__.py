"""Engine: tissue kinetics, Bühlmann ZH-L16 and oxygen exposure (pure numpy)."""
