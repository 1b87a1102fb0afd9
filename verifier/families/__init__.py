"""Families of complexes: generators the runner tests claims over (see SPEC §5)."""
