"""Benchmark (not a test): traveler and packet render time and peak memory, beside bare WeasyPrint renders.

    .venv/bin/python benchmarks/traveler.py [--assemblies 100] [--welds 5] [--skip-packet]

Builds a throwaway SQLite database and media folder in a temporary directory, seeds an invented job (one
assembly of 20 welds with four photos, then --assemblies assemblies of --welds welds), and measures, each in a
fresh child process so peak memory (ru_maxrss) is that step's own:

  * traveler: gather + render + store of the 20-weld traveler with four photos; beside it, a bare WeasyPrint
    render of the very same HTML (HTML(string).write_pdf(), no gathering, no storing);
  * batch: bare renders of 10 travelers' HTML one per pass, against the same 10 bodies rendered 5 per pass
    (one document, page breaks between); page numbers would not restart per assembly in the batched form;
  * packet: the whole --assemblies packet through inspections.packets.build_packet (what the worker runs).

Targets (issue 7, on the 2-core machine): traveler < 1.0 s (a bare render of a comparable page ~0.55 s);
100-assembly packet < 60 s with peak memory < 300 MB. The machine's load average is printed: other work on
the machine slows every figure alike, so compare the app's figures with the bare ones of the same run.
"""

import argparse
import json
import os
import resource
import secrets
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def _environment(folder: Path) -> dict:
    return {
        **os.environ,
        "DJANGO_SETTINGS_MODULE": "legwork.settings",
        "LEGWORK_VAR_DIR": str(folder),
        "LEGWORK_SQLITE_PATH": str(folder / "bench.sqlite3"),
        "LEGWORK_MEDIA_ROOT": str(folder / "media"),
        "LEGWORK_DEBUG": "0",
        "LEGWORK_SECRET_KEY": secrets.token_urlsafe(40),
        "LEGWORK_ALLOWED_HOSTS": "127.0.0.1",
        "LEGWORK_SSL_REDIRECT": "0",
        "LEGWORK_TASKS_INLINE": "1",
        "LEGWORK_LOG_LEVEL": "ERROR",
        "PYTHONPATH": str(ROOT),
    }


def _peak_mb() -> float:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # Linux: kilobytes


# --- child steps ------------------------------------------------------------------------------------------------

def _setup():
    import django

    django.setup()


def seed(assemblies: int, welds: int) -> dict:
    _setup()
    from django.core.management import call_command

    call_command("migrate", verbosity=0)
    from tests.factory import Factory
    from tests.pages_travelers import build_assembly

    make = Factory()
    qa = make.make_user("qa_lead", username="bench-qa")
    started = time.perf_counter()
    big = build_assembly(make, welds=20, photos=4, piece_mark="BIG-20")
    job = big.job
    for n in range(assemblies):
        build_assembly(make, welds=welds, photos=1 if n % 10 == 0 else 0, job=job, piece_mark=f"P{n + 1:03d}")
    return {"job": job.pk, "big": big.pk, "qa": qa.pk, "seconds": time.perf_counter() - started}


def traveler_step(big: int, qa: int) -> dict:
    _setup()
    from django.template.loader import render_to_string
    from weasyprint import HTML

    from core.models import User
    from core.pdf import _static_fetcher
    from inspections import traveler
    from inspections.models import Assembly

    assembly, user = Assembly.objects.get(pk=big), User.objects.get(pk=qa)
    traveler.render(traveler.gather(big), document_number="WARM-UP", revision=0)  # fonts and caches, once
    t0 = time.perf_counter()
    snapshot = traveler.gather(big)
    t1 = time.perf_counter()
    issued, _ = traveler.issue(assembly, user, snapshot=snapshot)
    t2 = time.perf_counter()
    context = traveler.render_context(snapshot, document_number="BARE", revision=0, issued_at=issued.generated_at,
                                      issued_by="")
    from core.roles import CAUTIONS, SAFETY_NOTE

    html = render_to_string(traveler.TEMPLATE, {"cautions": CAUTIONS, "safety_note": SAFETY_NOTE,
                                                "shop_name": "Legwork", **context})
    t3 = time.perf_counter()
    HTML(string=html, base_url="/", url_fetcher=_static_fetcher()).write_pdf()
    t4 = time.perf_counter()
    return {"gather_s": t1 - t0, "issue_s": t2 - t1, "total_s": t2 - t0, "bare_s": t4 - t3, "pages": issued.pages,
            "bytes": issued.size_bytes, "peak_mb": _peak_mb()}


def batch_step(job: int) -> dict:
    _setup()
    from django.template.loader import render_to_string
    from weasyprint import HTML

    from core.pdf import _static_fetcher
    from core.roles import CAUTIONS, SAFETY_NOTE
    from inspections import traveler
    from inspections.models import Assembly

    pks = list(Assembly.objects.filter(job_id=job).exclude(piece_mark="BIG-20").order_by("piece_mark")
               .values_list("pk", flat=True)[:10])
    htmls = []
    for pk in pks:
        context = traveler.render_context(traveler.gather(pk), document_number=f"B-{pk}", revision=0,
                                          issued_at=None, issued_by="")
        htmls.append(render_to_string(traveler.TEMPLATE, {"cautions": CAUTIONS, "safety_note": SAFETY_NOTE,
                                                          "shop_name": "Legwork", **context}))
    fetcher = _static_fetcher()
    HTML(string=htmls[0], url_fetcher=fetcher).write_pdf()  # warm-up
    t0 = time.perf_counter()
    for html in htmls:
        HTML(string=html, base_url="/", url_fetcher=fetcher).write_pdf()
    one = time.perf_counter() - t0

    def body(html):
        return html[html.index("<body>") + 6:html.index("</body>")]

    t0 = time.perf_counter()
    for start in range(0, len(htmls), 5):
        group = htmls[start:start + 5]
        joined = '<div style="break-before: page"></div>'.join(body(h) for h in group)
        head = group[0][:group[0].index("<body>") + 6]
        HTML(string=head + joined + "</body></html>", base_url="/", url_fetcher=fetcher).write_pdf()
    five = time.perf_counter() - t0
    return {"travelers": len(htmls), "one_per_pass_s": one, "five_per_pass_s": five}


def packet_step(job: int, qa: int) -> dict:
    _setup()
    from core.models import User
    from inspections.models import Assembly, JobPacket
    from inspections.packets import build_packet

    pks = list(Assembly.objects.filter(job_id=job).exclude(piece_mark="BIG-20").order_by("piece_mark")
               .values_list("pk", flat=True))
    packet = JobPacket.objects.create(job_id=job, document_number="PKT-BENCH", assembly_pks=pks,
                                      requested_by=User.objects.get(pk=qa))
    t0 = time.perf_counter()
    packet = build_packet(packet.pk)
    seconds = time.perf_counter() - t0
    return {"assemblies": len(pks), "state": packet.state, "error": packet.error, "seconds": seconds,
            "pages": packet.pages, "bytes": packet.file.size if packet.file else 0, "peak_mb": _peak_mb()}


STEPS = {"seed": seed, "traveler": traveler_step, "batch": batch_step, "packet": packet_step}


def _child(env, step, **kwargs) -> dict:
    out = subprocess.run([sys.executable, __file__, "--child", step, json.dumps(kwargs)], env=env, cwd=ROOT,
                         capture_output=True, text=True, timeout=1800)
    if out.returncode != 0:
        raise SystemExit(f"{step} failed:\n{out.stderr[-3000:]}")
    return json.loads(out.stdout.strip().splitlines()[-1])


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--assemblies", type=int, default=100)
    parser.add_argument("--welds", type=int, default=5, help="welds per packet assembly")
    parser.add_argument("--skip-packet", action="store_true")
    parser.add_argument("--child", nargs=2, help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.child:
        step, kwargs = args.child
        print(json.dumps(STEPS[step](**json.loads(kwargs))))
        return
    folder = Path(tempfile.mkdtemp(prefix="legwork-bench-"))
    env = _environment(folder)
    try:
        print(f"load average before: {' '.join(f'{x:.2f}' for x in os.getloadavg())} (2 cores)")
        seeded = _child(env, "seed", assemblies=args.assemblies, welds=args.welds)
        print(f"seeded 1 x 20-weld assembly + {args.assemblies} x {args.welds}-weld assemblies "
              f"in {seeded['seconds']:.1f} s")
        t = _child(env, "traveler", big=seeded["big"], qa=seeded["qa"])
        print(f"traveler, 20 welds + 4 photos: {t['total_s']:.2f} s (gather {t['gather_s']:.3f} s, render + store "
              f"{t['issue_s']:.2f} s), {t['pages']} pages, {t['total_s'] / t['pages']:.2f} s/page, "
              f"{t['bytes'] / 1024:.0f} KiB; bare WeasyPrint of the same HTML {t['bare_s']:.2f} s; "
              f"peak RSS {t['peak_mb']:.0f} MB   [target < 1.0 s]")
        b = _child(env, "batch", job=seeded["job"])
        print(f"bare renders of {b['travelers']} travelers: one per pass {b['one_per_pass_s']:.2f} s, "
              f"five per pass {b['five_per_pass_s']:.2f} s")
        if not args.skip_packet:
            p = _child(env, "packet", job=seeded["job"], qa=seeded["qa"])
            per_page = p["seconds"] / p["pages"] if p["pages"] else 0
            print(f"packet, {p['assemblies']} assemblies: {p['state']} in {p['seconds']:.1f} s, {p['pages']} pages, "
                  f"{per_page:.2f} s/page, {p['bytes'] / 1024 / 1024:.1f} MiB, peak RSS {p['peak_mb']:.0f} MB   "
                  f"[targets < 60 s, < 300 MB]{' ERROR ' + p['error'] if p['error'] else ''}")
        print(f"load average after: {' '.join(f'{x:.2f}' for x in os.getloadavg())}")
    finally:
        shutil.rmtree(folder, ignore_errors=True)


if __name__ == "__main__":
    main()
