"""The one place that calls WeasyPrint: a template and its context in, PDF bytes out.

Documents gather their data first (a snapshot dict), then render; a renderer never queries the
database. Fonts: DejaVu (Debian's fonts-dejavu-core), so output does not depend on the desktop.
"""

import hashlib
from dataclasses import dataclass

from django.conf import settings
from django.contrib.staticfiles import finders
from django.template.loader import render_to_string
from django.utils import timezone

from core.roles import CAUTIONS, SAFETY_NOTE


@dataclass(frozen=True)
class RenderedPDF:
    filename: str
    content: bytes
    mimetype: str = "application/pdf"

    @property
    def sha256(self) -> str:
        return hashlib.sha256(self.content).hexdigest()


def _static_fetcher():
    """Let templates use {% static %} paths without a web server, and refuse anything off this machine.

    WeasyPrint 70 takes a URLFetcher instance (a plain function no longer works): data: URIs (photos, QR
    codes) and static files are fetched, anything else is refused.
    """
    from weasyprint.urls import URLFetcher

    class LocalFetcher(URLFetcher):
        def fetch(self, url, headers=None):
            prefix = "/" + settings.STATIC_URL.lstrip("/")
            for start in (prefix, "file://" + prefix):
                if url.startswith(start):
                    path = finders.find(url[len(start):])
                    if path:
                        return super().fetch("file://" + path, headers)
            if url.startswith(("data:", "file://")):
                return super().fetch(url, headers)
            raise ValueError(f"PDF asked for {url!r}: only data: and static files are embedded (no network).")

    return LocalFetcher(allowed_protocols=("data", "file"))


PAPERS = {"a4": "A4", "letter": "letter"}


def paper_for(system: str | None = None, standard: str | None = None) -> str:
    """The paper a document prints on: the shop's LEGWORK_PAPER_SIZE when it names one ('A4' or 'letter'), else
    A4 for a metric (SI) record or one written to an ISO standard and US Letter for the rest."""
    chosen = str(getattr(settings, "LEGWORK_PAPER_SIZE", "") or "").strip().lower()
    if chosen in PAPERS:
        return PAPERS[chosen]
    iso = str(standard or "").strip().upper().startswith("ISO")
    return "A4" if system == "SI" or iso else "letter"


def render_pdf(template: str, context: dict, filename: str, *, paper: str | None = None) -> RenderedPDF:
    """Render a print template (templates/pdf/...) to a PDF on `paper` (paper_for(); default: the shop's choice,
    else Letter). The cautions, the shop's name and the paper are always in the context."""
    from weasyprint import HTML

    context = {"cautions": CAUTIONS, "safety_note": SAFETY_NOTE, "generated_at": timezone.now(),
               "shop_name": settings.LEGWORK_SHOP_NAME, "paper": paper or paper_for(), **context}
    html = render_to_string(template, context)
    content = HTML(string=html, base_url="/", url_fetcher=_static_fetcher()).write_pdf()
    return RenderedPDF(filename=filename, content=content)


def pdf_response(rendered: RenderedPDF, inline=True):
    from django.http import HttpResponse

    response = HttpResponse(rendered.content, content_type=rendered.mimetype)
    disposition = "inline" if inline else "attachment"
    response["Content-Disposition"] = f'{disposition}; filename="{rendered.filename}"'
    response["X-Content-SHA256"] = rendered.sha256
    return response
