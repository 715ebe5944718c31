"""Forms for the inspections app: every length through LengthFormField in the job's unit system."""
