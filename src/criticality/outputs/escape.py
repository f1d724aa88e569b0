"""The one LaTeX escape for plain text, shared by every output.

Pipeline place: a leaf under every renderer (it imports nothing of the
project), so that results, reports and checks escape text the same way.
"""

from __future__ import annotations

import unicodedata

__all__ = ["tex_text", "TEX_SPECIAL"]

#: plain-text character -> its LaTeX text-mode form
TEX_SPECIAL = {"\\": r"\textbackslash{}", "{": r"\{", "}": r"\}", "$": r"\$", "&": r"\&",
               "#": r"\#", "^": r"\^{}", "_": r"\_", "%": r"\%", "~": r"\~{}",
               "<": r"\textless{}", ">": r"\textgreater{}", "|": r"\textbar{}",
               "*": r"*\allowbreak{}", "/": r"/\allowbreak{}"}


def tex_text(text: str) -> str:
    """Plain text made safe for LaTeX (specials escaped, non-ASCII letters
    reduced to ASCII, long formulas in text allowed to break).

    >>> tex_text("a_1 > 5% & {b}")
    'a\\\\_1 \\\\textgreater{} 5\\\\% \\\\& \\\\{b\\\\}'
    >>> tex_text("Lotka–Volterra, café")
    'Lotka?Volterra, cafe'
    """
    plain = unicodedata.normalize("NFKD", str(text))
    out = []
    for ch in plain:
        if unicodedata.combining(ch):
            continue
        if ord(ch) > 126 or (ord(ch) < 32 and ch not in "\n\t"):
            out.append("?")
        else:
            out.append(TEX_SPECIAL.get(ch, ch))
    return "".join(out)
