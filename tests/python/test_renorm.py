"""Tests of the Python module renorm (run by ctest with PYTHONPATH=<build>/python).

Reference digits are read from tests/reference_values.hpp, which names their sources
(OEIS A006891 / A006890 for z = 2; Briggs, Math. Comp. 57 (1991) for z = 4).
"""
import os
import re
import sys
import tempfile
import unittest
from decimal import Decimal, localcontext, ROUND_HALF_EVEN
from fractions import Fraction

import renorm

HERE = os.path.dirname(os.path.abspath(__file__))


def reference(name):
    with open(os.path.join(HERE, "..", "reference_values.hpp"), encoding="utf-8") as f:
        text = f.read()
    m = re.search(r"\b%s\s*=\s*\"([0-9.]+)\"" % re.escape(name), text)
    if not m:
        raise KeyError(name)
    return m.group(1)


def rounded(text, digits):
    """text correctly rounded to `digits` significant digits."""
    with localcontext() as ctx:
        ctx.prec = digits
        ctx.rounding = ROUND_HALF_EVEN
        return str(+Decimal(text))


class Solve(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.r = renorm.solve(order=2, digits=50)

    def test_alpha_and_delta_match_published_50_digits(self):
        self.assertEqual(self.r.alpha_digits, 50)
        self.assertEqual(self.r.delta_digits, 50)
        self.assertEqual(self.r.digits, 50)
        self.assertEqual(self.r.alpha, rounded(reference("alpha_z2"), 50))
        self.assertEqual(self.r.delta, rounded(reference("delta_z2"), 50))
        self.assertFalse(self.r.certified)

    def test_structure(self):
        self.assertEqual(self.r.order, "2")
        self.assertGreater(self.r.N_check, self.r.N)
        self.assertGreater(self.r.N, 10)
        self.assertIn(len(self.r.coefficients), (self.r.N, self.r.N_check))
        # G(0) = 1 is the normalisation; G(y) = sum c_k s^k with s = (y - c)/r, so at y = 0
        # s = -c/r and the sum must give 1 to many digits.
        c, rad = self.r.disc
        s = Decimal(-c) / Decimal(rad)
        with localcontext() as ctx:
            ctx.prec = 70
            g0 = sum(Decimal(ck) * s ** k for k, ck in enumerate(self.r.coefficients))
        self.assertLess(abs(g0 - 1), Decimal("1e-45"))
        # the first eigenvalue after delta at z = 2 is the coordinate change alpha^-2
        self.assertEqual(len(self.r.eigenvalues), 4)
        e = self.r.eigenvalues[0]
        self.assertIn("coordinate change", e.kind)
        a = Decimal(self.r.alpha)
        with localcontext() as ctx:
            ctx.prec = 60
            self.assertLess(abs(Decimal(e.value) - 1 / (a * a)), Decimal("1e-25"))

    def test_as_mpmath(self):
        try:
            import mpmath
        except ImportError:
            self.skipTest("mpmath is not installed for this interpreter")
        alpha, delta = self.r.as_mpmath()
        self.assertIsInstance(alpha, mpmath.mpf)
        with mpmath.workdps(60):
            self.assertLess(abs(delta - mpmath.mpf(reference("delta_z2"))), mpmath.mpf("1e-48"))
            self.assertLess(abs(alpha - mpmath.mpf(reference("alpha_z2"))), mpmath.mpf("1e-48"))


class SolveOtherOrders(unittest.TestCase):
    def test_order_4_from_fraction_and_float_agree_with_published(self):
        a = renorm.solve(order=4, digits=15, eigenvalues=0)
        b = renorm.solve(order=Fraction(4), digits=15, eigenvalues=0)
        self.assertEqual(a.alpha, b.alpha)
        self.assertEqual(a.alpha, rounded(reference("alpha_z4"), 15))
        self.assertEqual(a.delta, rounded(reference("delta_z4"), 15))


class BadInput(unittest.TestCase):
    def test_order_below_one_raises_value_error(self):
        with self.assertRaises(ValueError):
            renorm.solve(order=0.5, digits=20)

    def test_other_bad_arguments(self):
        for kwargs in ({"order": 1}, {"order": "nan"}, {"order": "two"}, {"digits": 0},
                       {"digits": 2.5}, {"eigenvalues": -1}, {"order": True},
                       {"order": Fraction(1, 3)}):
            with self.subTest(**{k: repr(v) for k, v in kwargs.items()}):
                with self.assertRaises(ValueError):
                    renorm.solve(**kwargs)

    def test_bad_map_expression(self):
        with self.assertRaises(ValueError):
            renorm.cascade(map="1 - mu*x^", levels=3)


class CertifyVerify(unittest.TestCase):
    def test_certify_then_verify_then_reject_altered(self):
        c = renorm.certify(order=2, digits=20)
        self.assertEqual(c.status, "certified", c.message)
        self.assertTrue(c.certified)
        self.assertLess(c.alpha_radius, 1e-20)
        # the certified digits agree with the published ones
        n = min(len(c.alpha.replace(".", "")), 20)
        self.assertTrue(reference("alpha_z2").startswith(c.alpha[: n + 1]), c.alpha)
        self.assertTrue(reference("delta_z2").startswith(c.delta[:21]), c.delta)
        with tempfile.TemporaryDirectory() as d:
            path = os.path.join(d, "z2.cert.json")
            c.write(path)
            v = renorm.verify_file(path)
            self.assertTrue(v.accepted, v.reason)
            self.assertTrue(v.proved)
        # altering one claimed digit must be caught
        doc = c.document
        i = doc.index(c.alpha[:12])
        altered = doc[: i + 11] + ("1" if doc[i + 11] != "1" else "2") + doc[i + 12:]
        v = renorm.verify(altered)
        self.assertFalse(v.accepted)
        self.assertFalse(renorm.verify("not a certificate").accepted)
        self.assertTrue(renorm.verify("not a certificate").bad_input)


class Cascade(unittest.TestCase):
    def test_logistic_superstable_parameters_closed_forms(self):
        r = renorm.cascade(family="logistic", levels=13)
        self.assertFalse(r.failed, r.failure)
        self.assertTrue(all(l.certified for l in r.levels))
        try:
            import mpmath
        except ImportError:
            mpmath = None
        # closed forms: mu_0 = 2 (x = 1/2 fixed), mu_1 = 1 + sqrt(5)
        l1 = next(l for l in r.levels if l.n == 1)
        if mpmath is not None:
            with mpmath.workdps(60):
                exact = 1 + mpmath.sqrt(5)
                self.assertLess(abs(mpmath.mpf(l1.mu) - exact), mpmath.mpf(10) ** (-(len(l1.mu) - 3)))
        else:
            with localcontext() as ctx:
                ctx.prec = 60
                exact = 1 + Decimal(5).sqrt()
                self.assertLess(abs(Decimal(l1.mu) - exact), Decimal(10) ** (-(len(l1.mu) - 3)))
        self.assertGreater(len(l1.mu), 20)
        # the extrapolated limit of the ratios (an estimate) agrees with delta
        self.assertTrue(r.delta.ok)
        # (at 13 levels about 5 digits; each claimed digit must be right, to one unit in the
        # last place)
        self.assertGreaterEqual(r.delta.digits, 4)
        ulp = Decimal(10) ** (1 - r.delta.digits)
        self.assertLessEqual(abs(Decimal(r.delta.value) - Decimal(reference("delta_z2"))), ulp)
        self.assertLessEqual(abs(abs(Decimal(r.alpha.value)) - Decimal(reference("alpha_z2"))),
                             Decimal(10) ** (1 - r.alpha.digits))


class Table(unittest.TestCase):
    def test_rows_for_orders_2_and_4_match_published(self):
        rows = renorm.table([2, "4"], digits=15)
        self.assertEqual([r.order for r in rows], ["2", "4"])
        self.assertEqual([r.status for r in rows], ["estimated", "estimated"])
        self.assertEqual(rows[0].delta, rounded(reference("delta_z2"), 15))
        self.assertEqual(rows[1].alpha, rounded(reference("alpha_z4"), 15))
        with self.assertRaises(ValueError):
            renorm.table("2,0.5")


if __name__ == "__main__":
    unittest.main()
