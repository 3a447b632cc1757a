"""Rules about geometries (category `geometry`)."""
