"""State changes of procedures and welders: one function per step, each through core.transitions.transition."""
