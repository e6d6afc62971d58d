"""The judge: can the in-circuit reading judge the part, why, and what to do if not."""
