"""The 0.975 quantile of Student's t, shared by the golden scripts of
testdata/ (metrics, endtoend, nullmodel, report): the multiplier of the
paired AUC differences' 95% interval, mean -+ t SE with n - 1 degrees of
freedom (Student 1908).

It inverts the regularised incomplete beta function: P(|T| > t) =
I_x(df/2, 1/2) with x = df / (df + t^2), so t = sqrt(df (1/x - 1)) at
I_x = 0.05 (scipy.special.betaincinv). SciPy 1.10's scipy.stats.t.ppf
differs from R's qt and from the closed forms at df = 1 and 2 by up to
1e-9 relative; this form agrees with qt to about 1e-15 for the df of
these studies (testdata/metrics/golden.R writes R's values, which
metrics.TestT975AgainstR checks areasweep's quantile against).
"""
import math

from scipy.special import betaincinv


def student_t975(df):
    """The 0.975 quantile of Student's t with df degrees of freedom."""
    x = betaincinv(df / 2.0, 0.5, 0.05)
    return float(math.sqrt(df * (1.0 / x - 1.0)))
