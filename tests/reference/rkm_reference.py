"""Reads resistor values with the rkm-codes and QuantiPhy packages (PyPI), as an
independent reference for netmargin's value parser.

Input on stdin, one request a line: `rkm<TAB>code` (an IEC 60062 letter-and-digit
code, read with rkm_codes.from_rkm and its IEC 60062 letter map) or `si<TAB>text`
(a number with an SI prefix and an optional ohm unit, read with quantiphy.Quantity).
Output on stdout, one line a request: the value in ohms as `repr(float)`, or
`ERR <reason>` when the reference does not read it as a resistance.

Exits with status 3 and a line on stderr when the packages are not installed.
"""

import sys

try:
    import rkm_codes
    from quantiphy import Quantity
except ImportError as exc:  # pragma: no cover - depends on the machine
    print(f"missing reference package: {exc}", file=sys.stderr)
    sys.exit(3)

OHM_UNITS = {"", "\u03a9", "\u2126", "Ohm", "ohm", "Ohms", "ohms"}

rkm_codes.set_prefs(rkm_maps=rkm_codes.IEC60062_MAPS)


def read_rkm(code):
    # from_rkm matches a prefix of the text; insist that it reads all of it by
    # reading the code back out of the whole match
    for matcher in (rkm_codes.rkm_codes.ld_matcher, rkm_codes.rkm_codes.td_matcher):
        m = matcher.fullmatch(code)
        if m:
            break
    else:
        return "ERR not a whole letter-and-digit code"
    q = rkm_codes.from_rkm(code)
    if q is None:
        return "ERR not read"
    if q.units not in OHM_UNITS:
        return f"ERR units {q.units!r}"
    return repr(float(q))


def read_si(text):
    try:
        q = Quantity(text)
    except Exception as exc:  # QuantiPhy raises its own error types
        return f"ERR {type(exc).__name__}"
    if q.units not in OHM_UNITS:
        return f"ERR units {q.units!r}"
    return repr(float(q))


def main():
    for line in sys.stdin.read().splitlines():
        kind, _, text = line.partition("\t")
        if kind == "rkm":
            print(read_rkm(text))
        elif kind == "si":
            print(read_si(text))
        else:
            print(f"ERR unknown request {kind!r}")


main()
