"""What the tests read out of a calculation sheet's PDF (pypdf): its pages' text and its link annotations."""
from __future__ import annotations

import io

import pypdf


def pages_text(pdf: bytes) -> list[str]:
    return [page.extract_text() or "" for page in pypdf.PdfReader(io.BytesIO(pdf)).pages]


def link_uris(pdf: bytes) -> list[str]:
    """The URIs of every link annotation of the PDF."""
    uris = []
    for page in pypdf.PdfReader(io.BytesIO(pdf)).pages:
        for annotation in page.get("/Annots") or []:
            action = annotation.get_object().get("/A")
            if action is not None and "/URI" in action:
                uris.append(str(action["/URI"]))
    return uris
