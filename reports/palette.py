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

In the 3D views work not yet begun is drawn as a faint wire frame (a ghost of the works to
come): thin lines in a pale cool grey, or in a pale vermillion where the plan had the work
begun; elements with no linked activity are a dotted grey wire frame. A wire frame leaves
the site almost empty however many elements stand behind one another, where translucent
fills would add up to a grey block. The chart of planned against actual bars keeps the two apart without
colour: planned bars are a pale tint, hatched and outlined in deep blue; actual bars are
solid deep blue, so a greyscale print shows light hatched bars against dark plain ones.

The chart of each window's delay by party gives each party a colour of its own: the
employer deep blue, the contractor vermillion, neutral events a light grey (no one's risk
carries a hue), days concurrent between parties a dark grey, hatched.

``tests/test_element_timeline.py`` checks that every pair stays clearly apart under a
simulation of the three kinds of dichromacy.

References
----------
M. Okabe and K. Ito, "Color Universal Design (CUD): how to make figures and presentations
that are friendly to colorblind people", J*Fly, 2008 (the colours E69F00, 56B4E9, 0072B2,
D55E00, 000000 ...; recalled from memory).
"""

from __future__ import annotations

from types import MappingProxyType

__all__ = [
    "STATE_COLOURS",
    "GHOST_COLOURS",
    "HIGHLIGHT_COLOUR",
    "BACKGROUND_COLOUR",
    "PLANNED_BAR",
    "BUILT_BAR",
    "PARTY_COLOURS",
    "discrete_colourscale",
]

#: One fill colour per element state code (see :mod:`reports.element_timeline`).
STATE_COLOURS: tuple[str, ...] = (
    "#F3EFE0",  # 0 not started
    "#56B4E9",  # 1 in progress
    "#0072B2",  # 2 complete
    "#D55E00",  # 3 late against plan
    "#9A9A9A",  # 4 no linked activity
)

#: The faint wire frame of work not begun by the week shown (3D), by state code: "not
#: started" a pale cool grey, "late against plan" (not begun though the plan had it begun)
#: a pale vermillion. Only codes 0 and 3 are drawn so; the others repeat the solid colours.
GHOST_COLOURS: tuple[str, ...] = ("#C9CFD6", STATE_COLOURS[1], STATE_COLOURS[2], "#EFA982", STATE_COLOURS[4])

#: Planned bars (the chart of planned against actual bars): a pale tint of the sky blue,
#: hatched and outlined in deep blue.
PLANNED_BAR = MappingProxyType({"fill": "#E3F1FA", "line": "#0072B2", "pattern": "/"})

#: Actual bars: solid deep blue, no hatching.
BUILT_BAR = MappingProxyType({"fill": "#0072B2", "line": "#0072B2", "pattern": ""})

#: The colour of each party's days in the chart of each window's delay by party.
PARTY_COLOURS = MappingProxyType(
    {"employer": "#0072B2", "contractor": "#D55E00", "neutral": "#BBBBBB", "concurrent": "#5A5A5A"}
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

    Parameters
    ----------
    colours : tuple of str, default STATE_COLOURS
        The colours, one per value, as CSS colour text.

    Returns
    -------
    list of list
        ``[position, colour]`` pairs, two per colour, positions from 0 to 1.

    Examples
    --------
    >>> discrete_colourscale(("#000000", "#FFFFFF"))
    [[0.0, '#000000'], [0.5, '#000000'], [0.5, '#FFFFFF'], [1.0, '#FFFFFF']]
    """
    n = len(colours)
    scale: list[list] = []
    for k, colour in enumerate(colours):
        scale.append([k / n, colour])
        scale.append([(k + 1) / n, colour])
    return scale
