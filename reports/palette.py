"""Colours of the report's figures, chosen for readers with colour-vision deficiency.

The hues come from the eight-colour set of Okabe and Ito, published for figures that
readers with any common form of colour-vision deficiency can tell apart; the pale "not
started" fill and the neutral grey are our own additions (a light tint and a grey carry
no hue to confuse). Which colour stands for which state is our own choice:

- not started: a pale cream, so unbuilt work recedes;
- in progress: sky blue, and complete: deep blue (lighter to darker as work is done);
- late against plan: vermillion, the one warm colour, so lateness stands out;
- no linked activity: a neutral grey (the element is "greyed");
- elements of activities delayed by an event: a black outline.

``tests/test_element_timeline.py`` checks that every pair stays clearly apart under a
simulation of the three kinds of dichromacy.

References
----------
M. Okabe and K. Ito, "Color Universal Design (CUD): how to make figures and presentations
that are friendly to colorblind people", J*Fly, 2008 (the colours E69F00, 56B4E9, 0072B2,
D55E00, 000000 ...; recalled from memory).
"""

from __future__ import annotations

__all__ = ["STATE_COLOURS", "HIGHLIGHT_COLOUR", "BACKGROUND_COLOUR", "discrete_colourscale"]

#: One fill colour per element state code (see :mod:`reports.element_timeline`).
STATE_COLOURS: tuple[str, ...] = (
    "#F3EFE0",  # 0 not started
    "#56B4E9",  # 1 in progress
    "#0072B2",  # 2 complete
    "#D55E00",  # 3 late against plan
    "#9A9A9A",  # 4 no linked activity
)

#: Outline of the elements of activities delayed by an event.
HIGHLIGHT_COLOUR = "#000000"

#: Page and scene background.
BACKGROUND_COLOUR = "#FFFFFF"


def discrete_colourscale(colours: tuple[str, ...] = STATE_COLOURS) -> list[list]:
    """A plotly colourscale that paints value ``k`` (0 ... n-1) in ``colours[k]``.

    Use it with ``cmin = -0.5`` and ``cmax = n - 0.5``: each whole number then falls in the
    middle of its own band of the scale, and the bands have hard edges (each colour is
    given at both ends of its band).

    Example
    -------
    >>> discrete_colourscale(("#000000", "#FFFFFF"))
    [[0.0, '#000000'], [0.5, '#000000'], [0.5, '#FFFFFF'], [1.0, '#FFFFFF']]
    """
    n = len(colours)
    scale: list[list] = []
    for k, colour in enumerate(colours):
        scale.append([k / n, colour])
        scale.append([(k + 1) / n, colour])
    return scale
