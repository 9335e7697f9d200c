"""Fitting and comparing correlations: kLa power laws, Sherwood numbers, published catalogue.

Pure layer: numpy arrays in, small frozen dataclasses out; no I/O.

* :mod:`~scaleup.correlate.models`: fittable forms (:class:`ModelForm`) and per-run data
  (:func:`kla_observations`, :func:`sherwood_observations`);
* :mod:`~scaleup.correlate.published`: the published catalogue with sources and ranges;
* :mod:`~scaleup.correlate.fitting`: :func:`fit`, :func:`fit_kla`, :func:`fit_sherwood`,
  :class:`FitResult` (intervals, diagnostics, JSON round trip);
* :mod:`~scaleup.correlate.resampling`: vectorised bootstrap over runs or vessels;
* :mod:`~scaleup.correlate.validation`: leave-one-vessel-out, scale bias, comparisons,
  :class:`FitReport`;
* :mod:`~scaleup.correlate.runs`: per-run records of the service layer to observations;
* :mod:`~scaleup.correlate.domain`: fitted and stated domains, extrapolation distance.
"""

from scaleup.correlate.diagnostics import error_measures
from scaleup.correlate.domain import Domain, Extrapolation, domain_from_runs, stated_domain
from scaleup.correlate.fitting import (
    FitDidNotConverge,
    FitResult,
    Prediction,
    fit,
    fit_kla,
    fit_sherwood,
    kla_form,
)
from scaleup.correlate.models import (
    ModelForm,
    Observations,
    kla_observations,
    sherwood_observations,
)
from scaleup.correlate.published import (
    PublishedCorrelation,
    kl_correlations,
    kla,
    kla_correlations,
    kla_methods,
    published_correlation,
    sherwood,
    sherwood_correlations,
)
from scaleup.correlate.resampling import BootstrapResult, attach_bootstrap, bootstrap
from scaleup.correlate.runs import (
    kla_observations_from_columns,
    kla_observations_from_runs,
    sherwood_observations_from_fluxes,
)
from scaleup.correlate.validation import (
    FitReport,
    LeaveOneVesselOut,
    ScaleBias,
    compare_correlations,
    leave_one_vessel_out,
    report_fit,
)

__all__ = [
    "BootstrapResult", "Domain", "Extrapolation", "FitDidNotConverge", "FitReport", "FitResult",
    "LeaveOneVesselOut", "ModelForm", "Observations", "Prediction", "PublishedCorrelation",
    "ScaleBias", "attach_bootstrap", "bootstrap", "compare_correlations", "domain_from_runs",
    "error_measures", "fit", "fit_kla", "fit_sherwood", "kl_correlations", "kla",
    "kla_correlations", "kla_form", "kla_methods", "kla_observations",
    "kla_observations_from_columns", "kla_observations_from_runs", "leave_one_vessel_out", "published_correlation", "report_fit",
    "sherwood", "sherwood_correlations", "sherwood_observations",
    "sherwood_observations_from_fluxes", "stated_domain",
]
