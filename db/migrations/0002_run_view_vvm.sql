-- Schema version 2: the runs view gains the gas flow in vvm, so the runs can be sorted and
-- filtered by it. vvm is normal gas volume (0 degC, 101.325 kPa) per liquid volume per
-- minute: mol/s * 60 s/min * R T_normal / P_normal / V, with R = 8.314462618 J/(mol K),
-- T_normal = 273.15 K and P_normal = 101325 Pa (the constants of scaleup/units.py).

DROP VIEW run_view;

CREATE VIEW run_view AS
SELECT r.id AS id, r.ref AS ref, v.name AS vessel, m.name AS medium, m.coalescence AS coalescence,
       r.run_at AS run_at, r.speed_rps AS speed_rps, r.gas_flow_mol_s AS gas_flow_mol_s,
       r.gas_flow_mol_s * 60.0 * 8.314462618 * 273.15 / (101325.0 * v.working_volume_m3)
           AS gas_flow_vvm,
       r.o2_fraction_in AS o2_fraction_in, r.temperature_k AS temperature_k,
       coalesce(r.head_pressure_pa, v.head_pressure_pa) AS head_pressure_pa,
       r.power_measured_w AS power_measured_w, r.kla_per_s AS kla_per_s,
       r.kla_stderr_per_s AS kla_stderr_per_s, r.kla_method AS kla_method,
       r.gas_holdup AS gas_holdup, v.tank_diameter_m AS tank_diameter_m,
       v.working_volume_m3 AS working_volume_m3, r.vessel_id AS vessel_id,
       r.medium_id AS medium_id, r.notes AS notes,
       (SELECT count(*) FROM curve c WHERE c.run_id = r.id AND c.deleted_at IS NULL) AS n_curves
FROM run r JOIN vessel v ON v.id = r.vessel_id JOIN medium m ON m.id = r.medium_id
WHERE r.deleted_at IS NULL;
