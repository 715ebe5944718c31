"""State changes of jobs, assemblies, inspections and NCRs: one function per step, each through
core.transitions.transition (lock, check, save, history). Views call these and never set a state themselves;
a refused step raises core.errors.Refused, whose messages the view shows beside the button that asked."""
