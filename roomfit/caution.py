"""The one caution text that every summary, report, drawing and the page carries.

roomfit's figures can affect someone's safety and independence, so every output says that
they are advisory and who decides. One text, one place: the shells and the presentation
stage import it, none words its own.
"""

from __future__ import annotations

__all__ = ["CAUTION"]

#: Printed with every CLI summary, at the top and bottom of every report, in the title block
#: of every drawing, and on the page.
CAUTION = ("Caution: these results are advisory. Local building codes, the accessibility "
           "standards in force where the client lives, and licensed professionals decide.")
