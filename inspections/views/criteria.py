"""Criteria sets: the published ones, the clients' (derived, versioned), and deriving one."""

from django.contrib import messages
from django.db import IntegrityError, transaction
from django.db.models import Max
from django.http import Http404
from django.shortcuts import redirect, render
from django.views.decorators.http import require_http_methods, require_safe

from core import history
from core.inputs import parse_id
from core.roles import role_required
from core.visibility import get_visible_or_404, visible
from inspections import criteria as criteria_sets
from inspections.criteria.base import Banded, Count, Fixed, Permission, Proportional, Ratio, Threshold
from inspections.forms.jobs import CLIENT, CriteriaDeriveForm, base_set_choices
from inspections.models import ClientCriteriaSet


def describe_limit(limit) -> str:
    """A limit in a line, for the page (the engine's findings say the same when they apply it)."""
    text = criteria_sets.length_text
    if isinstance(limit, (Fixed, Threshold)):
        parts = [f"{label} {text(v, system)}" for label, v, system in (("US", limit.us, "US"), ("SI", limit.si, "SI"))
                 if v is not None]
        return " · ".join(parts)
    if isinstance(limit, Banded):
        def rows(bands, system):
            return ", ".join(f"{b.describe(system)}: {text(b.limit, system)}" for b in bands)
        return " · ".join(f"{system} {rows(bands, system)}" for system, bands in (("US", limit.us), ("SI", limit.si))
                          if bands)
    if isinstance(limit, Proportional):
        return limit.formula()
    if isinstance(limit, Permission):
        return limit.rule.replace("_", " ") + (f" ({limit.condition})" if limit.condition else "")
    if isinstance(limit, Count):
        return f"at most {limit.value}"
    if isinstance(limit, Ratio):
        return f"at most {limit.value * 100:g} %"
    return limit.kind


def _limit_rows(cset):
    return [{"name": name, "kind": limit.kind, "value": describe_limit(limit), "source": limit.cite(),
             "changed": name in cset.overridden, "loosened": name in cset.loosened}
            for name, limit in cset.limits.items()]


@require_safe
def criteria_list(request):
    return render(request, "inspections/criteria_list.html", {
        "published": criteria_sets.list_criteria(),
        "clients": visible(request.user, ClientCriteriaSet.objects.select_related("created_by")
                           .order_by("key", "-version")),
    })


@require_safe
def criteria_detail(request, key):
    try:
        cset = criteria_sets.get_criteria(key)
    except ValueError:
        raise Http404("No such criteria set.") from None
    return render(request, "inspections/criteria_detail.html", {"cset": cset, "rows": _limit_rows(cset)})


@require_safe
def criteria_client_detail(request, pk):
    stored = get_visible_or_404(request.user, ClientCriteriaSet.objects.select_related("created_by"), pk=pk)
    cset = stored.criteria_set()
    return render(request, "inspections/criteria_detail.html",
                  {"cset": cset, "stored": stored, "rows": _limit_rows(cset), "history": history.panel(stored)})


def _base(choice):
    """(the base as derive takes it, its CriteriaSet) for a published key or 'client:<pk>'; None if unknown."""
    if choice.startswith(f"{CLIENT}:"):
        pk = parse_id(choice.partition(":")[2])
        stored = ClientCriteriaSet.objects.filter(pk=pk).first() if pk is not None else None
        return (stored.definition, stored.criteria_set()) if stored else None
    try:
        return choice, criteria_sets.get_criteria(choice)
    except ValueError:
        return None


@role_required("criteria.derive")
@require_http_methods(["GET", "POST"])
def criteria_derive(request):
    choices = base_set_choices()
    choice = request.POST.get("base") or request.GET.get("base") or choices[0][0]
    found = _base(choice)
    if found is None:
        raise Http404("No such base set.")
    base_arg, base = found
    form = CriteriaDeriveForm(request.POST or None, base=base)
    if request.method == "POST" and form.is_valid():
        data = form.cleaned_data
        engineer = data["engineer_name"].strip()
        try:
            with transaction.atomic():
                latest = ClientCriteriaSet.objects.filter(key=data["key"]).aggregate(v=Max("version"))["v"] or 0
                derived = criteria_sets.derive(base_arg, data["key"], form.overrides(), data["title"],
                                               signed_by_engineer=bool(engineer), version=latest + 1)
                stored = ClientCriteriaSet(key=derived.key, version=derived.version, title=derived.title,
                                           base_key=base.key, definition=derived.to_dict(),
                                           signed_by_engineer=engineer if derived.loosened else "",
                                           created_by=request.user)
                stored.save(user=request.user, reason=f"Derived from {base.key}")
        except ValueError as exc:
            _place_error(form, str(exc))
        except IntegrityError:
            form.add_error("key", "Someone saved this key at the same moment; save again for the next version.")
        else:
            messages.success(request, f"{stored} saved.")
            return redirect(stored)
    rows = [(row, [form[n] for n in form.fields_of(row["name"])]) for row in _limit_rows(base)
            if form.fields_of(row["name"])]
    return render(request, "inspections/criteria_derive.html", {
        "form": form, "base": base, "choice": choice, "choices": choices, "rows": rows,
    }, status=400 if form.errors else 200)


def _place_error(form, message):
    """Show derive's refusal beside the limit it names, else at the top."""
    for name, fields in form.limit_fields:
        if f"'{name}'" in message:
            form.add_error(fields[0], message)
            return
    form.add_error(None, message)
