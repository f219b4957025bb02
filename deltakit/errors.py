"""The one exception deltakit raises for nonsense input.

Two kinds of bad input exist (see DEVELOPERS.md, "Error policy"):

* input that is nonsense in any context (a negative radius, ``mu <= 0``, a
  non-finite value, a final mass above the initial mass) raises
  :class:`DomainError`, whose message names the parameter, the rule it broke and,
  for arrays, how many elements broke it;
* valid input whose outcome is physically impossible (a burn too small to
  escape) gives NaN in the affected elements and never raises.
"""

from __future__ import annotations

__all__ = ["DomainError"]


class DomainError(ValueError):
    """An argument is outside the domain where the quantity has any meaning.

    It is a :class:`ValueError`, so ``except ValueError`` also catches it.

    Examples
    --------
    >>> import deltakit as dk
    >>> try:
    ...     dk.circular_speed(-1.0, 3.986e14)
    ... except dk.DomainError as err:
    ...     print(err)
    `r` must be > 0 m, got -1.0 m
    """
