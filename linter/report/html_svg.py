"""SVG text from the drawing libraries, made fit to sit inline in one HTML page.

Each figure's SVG is cut down to its ``<svg>`` element (no XML declaration, DOCTYPE or
comments), every ``id`` gets a per-figure prefix (and so does every reference to it:
``href="#…"``, ``xlink:href="#…"``, ``url(#…)``), so that two figures never share an id, and
the font family ``sans`` (not a CSS generic family) becomes ``sans-serif``.
"""

from __future__ import annotations

import re

__all__ = ["inline_svg", "label_markup"]

_PROLOG = re.compile(r"^.*?(?=<svg[\s>])", re.S)
_COMMENT = re.compile(r"<!--.*?-->", re.S)
_METADATA = re.compile(r"<metadata>.*?</metadata>\s*", re.S)
_ID = re.compile(r'\bid="([^"]+)"')


def inline_svg(svg: str, prefix: str) -> str:
    """``svg`` ready to be placed in an HTML body, its ids prefixed with ``prefix``.

    >>> inline_svg('<?xml version="1.0"?><svg><g id="a"/><use href="#a"/></svg>', "f1-")
    '<svg><g id="f1-a"/><use href="#f1-a"/></svg>'
    """
    text = _PROLOG.sub("", svg, count=1)
    text = _COMMENT.sub("", text)
    text = _METADATA.sub("", text)
    ids = set(_ID.findall(text))
    if ids:
        names = "|".join(re.escape(name) for name in sorted(ids, key=len, reverse=True))
        text = re.sub(rf'\bid="({names})"', lambda m: f'id="{prefix}{m.group(1)}"', text)
        text = re.sub(rf'(href="#|url\(#)({names})(?=["\)])',
                      lambda m: f"{m.group(1)}{prefix}{m.group(2)}", text)
    text = text.replace('font-family="sans"', 'font-family="sans-serif"')
    return text.strip()


def label_markup(text: str) -> str:
    """A label for schemdraw's SVG backend, which reads labels as XML markup.

    ``&``, ``<``, ``>`` and quotes are escaped (the backend parses them back into text and
    escapes them again on output) and ``$`` becomes ``&#36;`` so that a name never switches
    the backend into its maths notation.

    >>> label_markup('R<1> & "$x$"')
    'R&lt;1&gt; &amp; &quot;&#36;x&#36;&quot;'
    """
    from html import escape

    return escape(text, quote=True).replace("$", "&#36;")
