"""The cautions every projection carries. One place, so every output says the same thing."""

from __future__ import annotations

GENERAL = (
    "These are engineering estimates from correlations and pilot data, not a design "
    "guarantee: verify with the equipment supplier's data and defer to local codes and "
    "licensed engineering practice."
)
PRESSURE = (
    "Pressure vessel: head-space and sparger pressures must stay within the vessel's rated "
    "design pressure and its relief protection; this tool does not check mechanical design."
)
OXYGEN = (
    "Oxygen-enriched gas raises the flammability of seals, lubricants and organic media: use "
    "oxygen-clean equipment and materials rated for the O2 fraction."
)
FLAMMABLE = (
    "Hydrogen and solvent vapour form flammable mixtures with air: inert the head space, keep "
    "the exhaust below the lower flammable limit, and use equipment rated for the hazardous area."
)
ROTATING = (
    "Rotating machinery: agitator speed, shaft and seal loads at full scale must be confirmed by "
    "the supplier; never exceed the motor or gearbox rating."
)
HEAT = (
    "Heat removal: loss of cooling can lead to a temperature runaway; check the jacket and coil "
    "duty with the supplier and provide alarms and interlocks."
)


def cautions_for(*, o2_fraction: float | None = None, gas: str | None = None,
                 pressure_pa: float | None = None, scale: bool = True) -> list[str]:
    """The cautions that apply to a result: always the general one, others as they apply."""
    out = [GENERAL]
    if pressure_pa is not None and pressure_pa > 1.5e5:
        out.append(PRESSURE)
    if o2_fraction is not None and o2_fraction > 0.2095 + 1e-6:
        out.append(OXYGEN)
    if gas is not None and gas.upper() in ("H2", "CH4"):
        out.append(FLAMMABLE)
    if scale:
        out.extend([ROTATING, HEAT])
    return out
