"""Reading back what `rigcal report` wrote: the inline SVGs, the numbers in its tables, its notes.

The page prints every number it computes with its exact value in a data attribute, so the tests
compare those with independent calculations instead of parsing printed digits.
"""
import re
import xml.etree.ElementTree as ET

SVG_NS = "{http://www.w3.org/2000/svg}"


def svgs(html):
    """Each inline <svg> as an ElementTree element, keyed by its id. Fails if one is not well-formed XML."""
    out = {}
    for text in re.findall(r"<svg .*?</svg>", html, flags=re.S):
        root = ET.fromstring(text)
        out[root.get("id")] = root
    return out


def by_class(svg, css_class):
    """Elements of an SVG whose class is css_class."""
    return [e for e in svg.iter() if e.get("class") == css_class]


def numbers(text):
    return [float(v) for v in text.split()]


def table(html, css_class):
    """{quantity: [exact values in order]} for the <table class=css_class>."""
    match = re.search(r'<table class="%s">(.*?)</table>' % re.escape(css_class), html, flags=re.S)
    assert match, "no table of class " + css_class
    out = {}
    for key, value in re.findall(r'data-quantity="([^"]+)" data-value="([^"]+)"', match.group(1)):
        out.setdefault(key, []).append(float(value))
    return out


def field(html, key):
    """Text of the identity field data-field=key."""
    match = re.search(r'<dd data-field="%s">(.*?)</dd>' % re.escape(key), html, flags=re.S)
    assert match, "no identity field " + key
    return match.group(1)


def notes(html):
    return re.findall(r'<p class="note">(.*?)</p>', html, flags=re.S)
