"""The trends page's filters: date range, job, process (GET). A bad value is a message beside the field and the
default is used; never an error page."""

from datetime import date, timedelta

from django import forms

from core.visibility import jobs_visible_to
from core.vocabulary import Process
from inspections.services import trends

LONGEST = timedelta(days=3 * 366)  # a wider range is refused: the weekly charts would not be readable
EARLIEST, LATEST = date(1950, 1, 1), date(2199, 12, 31)  # a date outside is a typing slip, not a shop's record


class TrendFilterForm(forms.Form):
    start = forms.DateField(label="From", required=False, widget=forms.DateInput(attrs={"type": "date"}))
    end = forms.DateField(label="To", required=False, widget=forms.DateInput(attrs={"type": "date"}))
    job = forms.ModelChoiceField(label="Job", queryset=None, required=False, empty_label="All jobs")
    process = forms.ChoiceField(label="Process", choices=[("", "All processes"), *Process.choices], required=False)

    def __init__(self, data, user, today):
        defaults = trends.default_filters(today)
        super().__init__(data, initial={"start": defaults.start, "end": defaults.end})
        self.fields["job"].queryset = jobs_visible_to(user).order_by("-number")
        self.defaults = defaults
        for name, f in self.fields.items():
            f.widget.attrs["class"] = "form-select" if name in ("job", "process") else "form-control"

    def _clean_day(self, name):
        day = self.cleaned_data.get(name)
        if day is not None and not EARLIEST <= day <= LATEST:
            raise forms.ValidationError(f"Enter a date between {EARLIEST.year} and {LATEST.year}.")
        return day

    def clean_start(self):
        return self._clean_day("start")

    def clean_end(self):
        return self._clean_day("end")

    def clean(self):
        data = super().clean()
        if self.errors:
            return data
        start = data.get("start") or self.defaults.start
        end = data.get("end") or self.defaults.end
        if end < start:
            self.add_error("end", "The end of the range is before its start.")
        elif end - start > LONGEST:
            self.add_error("start", "Choose a range of at most three years.")
        return data

    def filters(self) -> trends.Filters:
        """The filters to draw: the valid fields as given, the defaults for the rest."""
        data = self.cleaned_data if self.is_bound and self.is_valid() else {}
        return trends.Filters(start=data.get("start") or self.defaults.start, end=data.get("end") or self.defaults.end,
                              job=data.get("job"), process=data.get("process") or "")
