"""renorm: universal constants of period-doubling renormalization from Python.

    >>> import renorm
    >>> r = renorm.solve(order=2, digits=50)
    >>> r.delta[:12]
    '4.6692016091'

Every number is a decimal string (no digit is lost to floating point); ``as_mpmath()`` turns
them into mpmath numbers when mpmath is installed. ``solve`` gives ESTIMATES (digits on which
two truncations agree); ``certify`` gives proved enclosures and a certificate that ``verify``
re-checks; ``cascade`` computes the same constants in a concrete map family.
"""

from dataclasses import dataclass, field
from decimal import Decimal, localcontext
from fractions import Fraction
import numbers
import os

from . import _renorm

__version__ = _renorm.version
git_commit = _renorm.git_commit

__all__ = [
    "solve", "certify", "verify", "verify_file", "cascade", "cascade_families",
    "SolveResult", "Eigenvalue", "CertifyResult", "Verdict", "CascadeResult", "CascadeLevel",
    "Limit", "ComputationError", "table", "TableRow",
]


class ComputationError(RuntimeError):
    """The computation did not converge or could not finish (the command's exit code 1)."""


def _order_text(order):
    """z as decimal text: int, float (its shortest repr), Fraction, Decimal or str."""
    if isinstance(order, bool):
        raise ValueError("order must be a number > 1, not a bool")
    if isinstance(order, str):
        return order.strip()
    if isinstance(order, numbers.Integral):
        return str(int(order))
    if isinstance(order, float):
        return repr(order)
    if isinstance(order, Decimal):
        return str(order)
    if isinstance(order, Fraction):
        den = order.denominator
        for p in (2, 5):
            while den % p == 0:
                den //= p
        if den != 1:
            raise ValueError("order %s has no finite decimal expansion" % order)
        with localcontext() as ctx:
            ctx.prec = 4 * len(str(order.denominator)) + len(str(order.numerator)) + 10
            return str(Decimal(order.numerator) / Decimal(order.denominator))
    raise ValueError("order must be a number > 1 (int, float, Fraction, Decimal or str), got %r"
                     % (order,))


def _int_arg(name, value, lo, hi):
    if isinstance(value, bool) or not isinstance(value, numbers.Integral):
        raise ValueError("%s must be an integer, got %r" % (name, value))
    value = int(value)
    if not lo <= value <= hi:
        raise ValueError("%s must be in %d..%d, got %d" % (name, lo, hi, value))
    return value


def _mpf(text, digits):
    try:
        import mpmath
    except ImportError as e:  # pragma: no cover - depends on the installation
        raise ImportError("as_mpmath() needs mpmath (Debian: apt-get install python3-mpmath)") from e
    with mpmath.workdps(max(int(digits), 15) + 5):
        return mpmath.mpf(text)


@dataclass(frozen=True)
class Eigenvalue:
    """An eigenvalue of DT after delta: decimal text, its kind, and the digits shown."""
    value: str
    approx: complex
    kind: str
    digits: int


@dataclass(frozen=True)
class SolveResult:
    """Estimates for one order z (no guarantee: see certify())."""
    order: str
    alpha: str
    delta: str
    alpha_digits: int
    delta_digits: int
    eigenvalues: list
    N: int
    N_check: int
    precision_bits: int
    log10_residual: float
    seconds: float
    disc: tuple
    coefficients: list = field(repr=False)
    certified: bool = False

    @property
    def digits(self):
        """Digits stable for both alpha and delta (never more than requested)."""
        return min(self.alpha_digits, self.delta_digits)

    def as_mpmath(self):
        """(alpha, delta) as mpmath.mpf numbers (needs mpmath)."""
        return _mpf(self.alpha, self.alpha_digits), _mpf(self.delta, self.delta_digits)


def solve(order=2, digits=50, eigenvalues=4):
    """Estimate alpha, delta and the next eigenvalues of DT for a critical point of order z.

    order: z > 1 (int, float, Fraction, Decimal or decimal str); digits >= 1; eigenvalues 0..50.
    Raises ValueError for bad input, ComputationError when the solver does not converge.
    The values are ESTIMATES: only digits on which two truncations agree are returned.
    """
    z = _order_text(order)
    d = _int_arg("digits", digits, 1, 10**7)
    k = _int_arg("eigenvalues", eigenvalues, 0, 50)
    r = _renorm.solve(z, d, k)
    if not r["converged"]:
        raise ComputationError("no result for z = %s: %s" % (z, r["message"]))
    ev = [Eigenvalue(e["value"], complex(e["approx"]), e["kind"], e["digits"])
          for e in r["eigenvalues"]]
    return SolveResult(order=z, alpha=r["alpha"], delta=r["delta"],
                       alpha_digits=r["alpha_digits"], delta_digits=r["delta_digits"],
                       eigenvalues=ev, N=r["N"], N_check=r["N_check"],
                       precision_bits=r["precision_bits"], log10_residual=r["log10_residual"],
                       seconds=r["seconds"], disc=tuple(r["disc"]),
                       coefficients=list(r["coefficients"]))


@dataclass(frozen=True)
class CertifyResult:
    """A proof attempt. status: 'certified', 'too_wide' (proved, but radius >= 10^-digits),
    'not_certified' or 'failed' (no approximate fixed point)."""
    order: str
    status: str
    message: str
    alpha: str = ""
    delta: str = ""
    alpha_enclosure: str = ""
    delta_enclosure: str = ""
    alpha_radius: float = float("inf")
    delta_radius: float = float("inf")
    N: int = 0
    precision_bits: int = 0
    disc: tuple = ()
    document: str = field(default="", repr=False)

    @property
    def certified(self):
        return self.status == "certified"

    def write(self, path):
        """Write the certificate (JSON) to path; only a certified result has one."""
        if not self.certified:
            raise ValueError("not certified (%s): no certificate to write" % self.status)
        tmp = "%s.tmp%d" % (path, os.getpid())
        with open(tmp, "w", encoding="utf-8") as f:
            f.write(self.document)
        os.replace(tmp, path)

    def as_mpmath(self):
        """(alpha, delta) as mpmath.mpf numbers from the certified digits (needs mpmath)."""
        if not self.alpha:
            raise ValueError("no certified digits (%s)" % self.status)
        return _mpf(self.alpha, len(self.alpha)), _mpf(self.delta, len(self.delta))


def certify(order=2, digits=30, out=None):
    """Prove enclosures of alpha and delta with radius below 10^-digits (5 <= digits <= 2000).
    When out is given and the proof succeeds, the certificate is written there."""
    z = _order_text(order)
    d = _int_arg("digits", digits, 5, 2000)
    r = _renorm.certify(z, d)
    result = CertifyResult(**{k: (tuple(v) if k == "disc" else v) for k, v in r.items()})
    if out is not None and result.certified:
        result.write(out)
    return result


@dataclass(frozen=True)
class Verdict:
    """The verdict on a certificate: accepted, or the reason it was rejected."""
    accepted: bool
    bad_input: bool
    reason: str
    proved: list

    def __bool__(self):
        return self.accepted


def verify(text):
    """Re-check a certificate given as its JSON text (never raises for bad text)."""
    if isinstance(text, bytes):
        text = text.decode("utf-8", errors="replace")
    r = _renorm.verify(text)
    return Verdict(r["accepted"], r["bad_input"], r["reason"], list(r["proved"]))


def verify_file(path):
    """Re-check the certificate stored in the file at path."""
    with open(path, "rb") as f:
        return verify(f.read())


@dataclass(frozen=True)
class CascadeLevel:
    n: int
    period: int
    certified: bool
    mu: str
    mu_radius: float
    delta: object  # str or None
    alpha: object  # str or None


@dataclass(frozen=True)
class Limit:
    """An extrapolated limit: an ESTIMATE with the digits on which the variants agree."""
    ok: bool
    value: str
    digits: int
    error: float


@dataclass(frozen=True)
class CascadeResult:
    family: str
    formula: str
    kind: str
    critical_point: str
    levels: list
    failed: bool
    failure: str
    accumulation_point: Limit
    delta: Limit
    alpha: Limit


def cascade_families():
    """Names of the built-in map families."""
    return list(_renorm.cascade_families())


def cascade(family="quadratic", levels=10, order=2, map=None, critical=None,
            kind="superstable"):
    """Superstable (or period-doubling) parameters of a map family for levels 1..levels, the
    ratios delta_n and alpha_n, and extrapolated limits (estimates).

    family: a built-in name (see cascade_families()), or map: an expression in x and mu
    (with critical: the critical point as a constant expression, or None to locate it).
    """
    lv = _int_arg("levels", levels, 1, 34)
    r = _renorm.cascade(family if map is None else "", map or "", critical or "",
                        _order_text(order), lv, kind)
    ls = [CascadeLevel(**x) for x in r["levels"]]
    return CascadeResult(r["family"], r["formula"], r["kind"], r["critical_point"], ls,
                         r["failed"], r["failure"], Limit(**r["accumulation_point"]),
                         Limit(**r["delta"]), Limit(**r["alpha"]))


@dataclass(frozen=True)
class TableRow:
    """One order of a table. status: 'certified' (enclosures, radius given), 'estimated'
    (digits two truncations agree on) or 'failed' (reason in note)."""
    order: str
    status: str
    alpha: str
    alpha_digits: int
    delta: str
    delta_digits: int
    eigenvalues: list  # (value, digits, kind) tuples
    radius: str
    N: int
    N_check: int
    precision_bits: int
    seconds: float
    note: str


def table(orders, digits=30, eigenvalues=0, certify=False, threads=2):
    """Rows of a reference table, one per order z. orders: a list of numbers, or the text the
    command accepts ("2,4,6", ranges "A:B:STEP" such as "1.5:3:0.5"). A row that fails is kept
    with status 'failed' and the reason in note."""
    if not isinstance(orders, str):
        orders = ",".join(_order_text(z) for z in orders)
    rows = _renorm.table(orders, _int_arg("digits", digits, 1, 5000),
                         _int_arg("eigenvalues", eigenvalues, 0, 50), bool(certify),
                         _int_arg("threads", threads, 1, 256))
    return [TableRow(**{**r, "eigenvalues": [tuple(e) for e in r["eigenvalues"]]}) for r in rows]
