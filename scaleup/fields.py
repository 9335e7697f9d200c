"""What each stored field is: its column, kind of quantity, lab unit and accepted range.

One table per entity, used by the command line (options), the terminal app (forms), the
importers (column matching, templates) and the service layer (validation before anything is
written). Ranges are what is physically possible for a stirred gas-liquid vessel, a little
wider than anything a pilot or production plant would run, so that a typo is caught but an
unusual vessel is not refused.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from datetime import datetime

from scaleup import units
from scaleup.errors import InputError, check_range


@dataclass(frozen=True)
class Field:
    """One stored field.

    ``kind`` is a :data:`scaleup.units.KINDS` key, ``"gas_flow"``, ``"text"``, ``"int"``,
    ``"choice"``, ``"date"`` or ``"fraction"``. ``low``/``high`` are SI.
    """

    column: str
    label: str
    kind: str
    required: bool = False
    low: float | None = None
    high: float | None = None
    choices: tuple[str, ...] = ()
    default: object = None
    help: str = ""

    @property
    def unit(self) -> str:
        """The lab unit shown to people for this field ("" when it has none)."""
        if self.kind == "gas_flow":
            return "NL/min"
        if self.kind in units.KINDS:
            return units.KINDS[self.kind].display_label
        return ""

    @property
    def option(self) -> str:
        """The command-line option spelling, e.g. ``--tank-diameter``."""
        return "--" + self.label.replace(" ", "-").replace("_", "-")

    def range_text(self) -> str:
        """The accepted range in lab units, for help texts and templates."""
        if self.choices:
            return "one of: " + ", ".join(self.choices)
        if self.low is None and self.high is None:
            return ""
        def show(v):
            if self.kind in units.KINDS and units.KINDS[self.kind].si != "dimensionless":
                return units.format_quantity(v, self.kind)
            return units.sig(v)
        lo = show(self.low) if self.low is not None else None
        hi = show(self.high) if self.high is not None else None
        if lo and hi:
            return f"{lo} to {hi}"
        return f"at least {lo}" if lo else f"at most {hi}"


def read(field: Field, value: object, **context) -> object:
    """Turn what a person typed (or a number from a file) into the stored SI value.

    Text with a unit goes through :func:`scaleup.units.parse`; numbers from a file are taken as
    already in SI only when ``context["si"]`` is true. The range is checked and the message
    names the field, the value, the range and its unit.
    """
    name = field.label
    if value is None or (isinstance(value, str) and not value.strip()):
        if field.required:
            raise InputError("is required", name, value)
        return field.default
    if isinstance(value, float) and math.isnan(value):
        if field.required:
            raise InputError("is required", name, value)
        return None
    if field.kind == "text":
        return str(value).strip()
    if field.kind == "date":
        return _read_date(str(value).strip(), name)
    if field.kind == "choice":
        text = str(value).strip().lower().replace("_", "-").replace(" ", "-")
        if text not in field.choices:
            raise InputError(f'"{value}" is not one of: {", ".join(field.choices)}', name, value)
        return text
    if field.kind == "int":
        try:
            number = float(str(value).strip())
        except ValueError:
            raise InputError(f'"{value}" is not a whole number', name, value) from None
        if not number.is_integer():
            raise InputError(f'"{value}" is not a whole number', name, value)
        check_range(name, number, field.low, field.high)
        return int(number)
    si = context.pop("si", False)
    if isinstance(value, (int, float)) and not isinstance(value, bool) and si:
        number = float(value)
    elif field.kind == "gas_flow":
        number = units.parse_gas_flow(str(value), name, **_gas_context(context))
    else:
        number = units.parse(value if not isinstance(value, bool) else str(value), field.kind,
                             name)
    if field.low is not None or field.high is not None:
        _check(field, number, value)
    return number


# Readings kept per file: a column of 100,000 runs holds a few hundred distinct cells
_KEPT_KINDS = frozenset(units.KINDS) | {"gas_flow"}
KNOWN_MAX = 100_000


def read_known(field: Field, value: object, known: dict, context: dict, si: bool) -> object:
    """``read(field, value, **context, si=si)``, with each distinct text of a quantity column
    read once per file.

    ``known`` is kept by an importer for one file; a refused cell is not kept, so every
    row with it is refused with the same message. A gas flow is kept with the liquid
    volume, temperature and pressure it was read at (the only kind that reads ``context``).
    """
    kind = field.kind
    if kind not in _KEPT_KINDS or not isinstance(value, str):
        return read(field, value, **context, si=si) if kind == "gas_flow" else \
            read(field, value, si=si)
    key = ("cell", field.column, value) if kind != "gas_flow" else (
        "cell", field.column, value, context.get("liquid_volume_m3"),
        context.get("temperature_k"), context.get("pressure_pa"))
    number = known.get(key)
    if number is None:
        number = read(field, value, **context, si=si)
        if len(known) < KNOWN_MAX:
            known[key] = number
    return number


def _gas_context(context: dict) -> dict:
    return {k: context.get(k) for k in ("liquid_volume_m3", "temperature_k", "pressure_pa")}


def _check(field: Field, number: float, typed: object) -> None:
    ok = (field.low is None or number >= field.low) and (field.high is None or number <= field.high)
    if not ok:
        shown = typed if isinstance(typed, str) else units.sig(number)
        raise InputError(f'"{shown}" is outside the accepted range {field.range_text()}',
                         field.label, typed)


def _read_date(text: str, name: str) -> str:
    try:
        parsed = datetime.fromisoformat(text.replace("Z", "+00:00"))
    except ValueError:
        raise InputError(f'"{text}" is not an ISO 8601 date or date-time such as '
                         '"2026-03-14" or "2026-03-14T09:30"', name, text) from None
    return parsed.isoformat(timespec="minutes") if ("T" in text or " " in text) else \
        parsed.date().isoformat()


def fields_by_label(fields: tuple[Field, ...]) -> dict[str, Field]:
    return {f.label: f for f in fields}


VESSEL = (
    Field("name", "name", "text", required=True, help="A short unique name, e.g. V-300."),
    Field("tank_diameter_m", "tank diameter", "length", True, 0.05, 20.0,
          help="Inside diameter of the tank, T."),
    Field("liquid_height_m", "liquid height", "length", False, 0.02, 60.0,
          help="Liquid height at rest, H (or give the working volume)."),
    Field("working_volume_m3", "working volume", "volume", False, 1e-4, 2000.0,
          help="Liquid volume at rest (or give the liquid height)."),
    Field("bottom_shape", "bottom shape", "choice", choices=("flat", "elliptical",
                                                             "torispherical"), default="flat",
          help="Shape of the vessel bottom; elliptical is the 2:1 head."),
    Field("baffle_count", "baffle count", "int", False, 0, 12, default=4),
    Field("baffle_width_m", "baffle width", "length", False, 0.0, 5.0,
          help="Radial width of one baffle (typically T/10 or T/12)."),
    Field("head_pressure_pa", "head pressure", "pressure", False, 1e4, 1e7, default=101325.0,
          help="Absolute pressure in the head space (barg is converted)."),
    Field("jacket_area_m2", "jacket area", "area", False, 0.0, 1e4),
    Field("jacket_u_w_m2_k", "jacket u", "heat_transfer_coefficient", False, 1.0, 1e4),
    Field("coil_area_m2", "coil area", "area", False, 0.0, 1e4),
    Field("coil_u_w_m2_k", "coil u", "heat_transfer_coefficient", False, 1.0, 1e4),
    Field("motor_power_limit_w", "motor limit", "power", False, 1.0, 1e7,
          help="Rated shaft power of the drive."),
    Field("notes", "notes", "text", default=""),
)

IMPELLER = (
    Field("impeller_type", "impeller type", "text", True,
          help="Generic type from the catalogue, e.g. disc-turbine."),
    Field("impeller_diameter_m", "impeller diameter", "length", True, 0.01, 15.0),
    Field("clearance_m", "clearance", "length", True, 0.0, 50.0,
          help="Height of the impeller above the vessel bottom."),
    Field("blade_count", "blade count", "int", False, 1, 16),
    Field("blade_width_m", "blade width", "length", False, 0.001, 5.0),
    Field("power_number_measured", "power number", "fraction", False, 0.01, 50.0,
          help="A measured turbulent power number; overrides the catalogue."),
)

SPARGER = (
    Field("sparger_type", "sparger type", "choice",
          choices=("ring", "pipe", "porous", "orifice", "nozzle"), default="ring"),
    Field("sparger_diameter_m", "sparger diameter", "length", False, 0.001, 15.0),
    Field("sparger_height_m", "sparger height", "length", False, 0.0, 50.0,
          help="Height of the sparger above the vessel bottom."),
    Field("orifice_count", "orifice count", "int", False, 1, 100000),
    Field("orifice_diameter_m", "orifice diameter", "length", False, 1e-5, 0.1),
)

MEDIUM = (
    Field("name", "name", "text", required=True),
    Field("coalescence", "coalescence", "choice",
          choices=("coalescing", "non-coalescing", "viscous"), default="coalescing",
          help="Coalescing (water, dilute broth), non-coalescing (salt solutions), viscous."),
    Field("density_kg_m3", "density", "density", False, 500.0, 2500.0,
          help="Measured density; water at the run temperature when empty."),
    Field("viscosity_pa_s", "viscosity", "viscosity", False, 1e-4, 1000.0,
          help="Measured dynamic viscosity; water at the run temperature when empty."),
    Field("surface_tension_n_m", "surface tension", "surface_tension", False, 0.005, 0.1),
    Field("notes", "notes", "text", default=""),
)

RUN = (
    Field("ref", "ref", "text", help="Your own identifier of the run (notebook or sample id); "
          "unique in the campaign."),
    Field("vessel", "vessel", "text", True, help="Name of the vessel."),
    Field("medium", "medium", "text", True, help="Name of the medium."),
    Field("run_at", "date", "date", True, help="Date (and time) of the run, ISO 8601."),
    Field("speed_rps", "speed", "speed", True, 0.05, 100.0, help="Agitator speed."),
    Field("gas_flow_mol_s", "gas flow", "gas_flow", True, 0.0, 1000.0,
          help="Gas flow: NL/min, Nm3/h, vvm (normal basis, 0 degC and 101.325 kPa) or mol/s."),
    Field("o2_fraction_in", "o2 fraction", "fraction", False, 0.0, 1.0, default=0.2095,
          help="O2 mole fraction of the inlet gas (0.2095 for air)."),
    Field("temperature_k", "temperature", "temperature", True, 273.15, 423.15),
    Field("head_pressure_pa", "head pressure", "pressure", False, 1e4, 1e7,
          help="Head-space pressure of this run; the vessel's when empty."),
    Field("power_measured_w", "measured power", "power", False, 0.0, 1e7),
    Field("torque_measured_n_m", "measured torque", "torque", False, 0.0, 1e7),
    Field("kla_per_s", "kla", "kla", False, 1e-5, 10.0, help="Measured kLa."),
    Field("kla_stderr_per_s", "kla stderr", "kla", False, 0.0, 10.0,
          help="Standard error of the measured kLa."),
    Field("kla_method", "kla method", "choice",
          choices=("gassing-out", "dynamic", "gas-balance", "sulfite", "entered")),
    Field("gas_holdup", "gas holdup", "fraction", False, 0.0, 0.99),
    Field("notes", "notes", "text", default=""),
)

FLUX = (
    Field("solute", "solute", "text", True),
    Field("interfacial_area_m2", "interfacial area", "area", True, 1e-8, 1e6),
    Field("flux_mol_m2_s", "flux", "molar_flux", True, -1e3, 1e3),
    Field("c_interface_mol_m3", "interface concentration", "concentration", True, 0.0, 1e5),
    Field("c_bulk_mol_m3", "bulk concentration", "concentration", True, 0.0, 1e5),
    Field("characteristic_length_m", "length", "length", True, 1e-6, 100.0),
    Field("velocity_m_s", "velocity", "velocity", True, 0.0, 100.0),
    Field("temperature_k", "temperature", "temperature", True, 273.15, 423.15),
    Field("diffusivity_m2_s", "diffusivity", "diffusivity", False, 1e-13, 1e-3),
    Field("density_kg_m3", "density", "density", False, 0.01, 2500.0),
    Field("viscosity_pa_s", "viscosity", "viscosity", False, 1e-6, 1000.0),
    Field("notes", "notes", "text", default=""),
)
