-- Campaign schema, version 1. Every column carries its SI unit in its name.
-- CHECK constraints reject what is physically impossible; soft deletes keep history.

CREATE TABLE vessel (
    id INTEGER PRIMARY KEY,
    name TEXT NOT NULL UNIQUE CHECK (length(trim(name)) > 0),
    tank_diameter_m REAL NOT NULL CHECK (tank_diameter_m > 0 AND tank_diameter_m <= 20),
    liquid_height_m REAL CHECK (liquid_height_m IS NULL OR (liquid_height_m > 0 AND liquid_height_m <= 60)),
    working_volume_m3 REAL CHECK (working_volume_m3 IS NULL OR (working_volume_m3 > 0 AND working_volume_m3 <= 2000)),
    bottom_shape TEXT NOT NULL DEFAULT 'flat'
        CHECK (bottom_shape IN ('flat', 'elliptical', 'torispherical')),
    baffle_count INTEGER NOT NULL DEFAULT 4 CHECK (baffle_count BETWEEN 0 AND 12),
    baffle_width_m REAL CHECK (baffle_width_m IS NULL OR (baffle_width_m >= 0 AND baffle_width_m < tank_diameter_m / 2)),
    head_pressure_pa REAL NOT NULL DEFAULT 101325 CHECK (head_pressure_pa > 0 AND head_pressure_pa <= 1e7),
    jacket_area_m2 REAL CHECK (jacket_area_m2 IS NULL OR jacket_area_m2 >= 0),
    jacket_u_w_m2_k REAL CHECK (jacket_u_w_m2_k IS NULL OR jacket_u_w_m2_k > 0),
    coil_area_m2 REAL CHECK (coil_area_m2 IS NULL OR coil_area_m2 >= 0),
    coil_u_w_m2_k REAL CHECK (coil_u_w_m2_k IS NULL OR coil_u_w_m2_k > 0),
    motor_power_limit_w REAL CHECK (motor_power_limit_w IS NULL OR motor_power_limit_w > 0),
    notes TEXT NOT NULL DEFAULT '',
    created_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ', 'now')),
    updated_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ', 'now')),
    deleted_at TEXT,
    row_version INTEGER NOT NULL DEFAULT 1,
    CHECK (liquid_height_m IS NOT NULL OR working_volume_m3 IS NOT NULL)
);

CREATE TABLE impeller (
    id INTEGER PRIMARY KEY,
    vessel_id INTEGER NOT NULL REFERENCES vessel (id) ON DELETE CASCADE,
    position INTEGER NOT NULL DEFAULT 1 CHECK (position >= 1),  -- 1 is the lowest
    impeller_type TEXT NOT NULL CHECK (length(impeller_type) > 0),
    impeller_diameter_m REAL NOT NULL CHECK (impeller_diameter_m > 0),
    clearance_m REAL NOT NULL CHECK (clearance_m >= 0),  -- height of the impeller above the bottom
    blade_count INTEGER CHECK (blade_count IS NULL OR blade_count BETWEEN 1 AND 16),
    blade_width_m REAL CHECK (blade_width_m IS NULL OR blade_width_m > 0),
    power_number_measured REAL CHECK (power_number_measured IS NULL OR (power_number_measured > 0 AND power_number_measured < 50)),
    UNIQUE (vessel_id, position)
);

-- an impeller must be narrower than its tank (a CHECK cannot see the vessel row)
CREATE TRIGGER impeller_fits_tank_insert BEFORE INSERT ON impeller
WHEN NEW.impeller_diameter_m >= (SELECT tank_diameter_m FROM vessel WHERE id = NEW.vessel_id)
BEGIN
    SELECT RAISE(ABORT, 'impeller_diameter_m must be smaller than the tank diameter');
END;
CREATE TRIGGER impeller_fits_tank_update BEFORE UPDATE ON impeller
WHEN NEW.impeller_diameter_m >= (SELECT tank_diameter_m FROM vessel WHERE id = NEW.vessel_id)
BEGIN
    SELECT RAISE(ABORT, 'impeller_diameter_m must be smaller than the tank diameter');
END;
CREATE TRIGGER vessel_wider_than_impellers BEFORE UPDATE OF tank_diameter_m ON vessel
WHEN NEW.tank_diameter_m <= (SELECT max(impeller_diameter_m) FROM impeller WHERE vessel_id = NEW.id)
BEGIN
    SELECT RAISE(ABORT, 'tank_diameter_m must be larger than every impeller diameter');
END;

CREATE TABLE sparger (
    id INTEGER PRIMARY KEY,
    vessel_id INTEGER NOT NULL UNIQUE REFERENCES vessel (id) ON DELETE CASCADE,
    sparger_type TEXT NOT NULL DEFAULT 'ring' CHECK (sparger_type IN ('ring', 'pipe', 'porous', 'orifice', 'nozzle')),
    sparger_diameter_m REAL CHECK (sparger_diameter_m IS NULL OR sparger_diameter_m > 0),
    sparger_height_m REAL CHECK (sparger_height_m IS NULL OR sparger_height_m >= 0),
    orifice_count INTEGER CHECK (orifice_count IS NULL OR orifice_count >= 1),
    orifice_diameter_m REAL CHECK (orifice_diameter_m IS NULL OR orifice_diameter_m > 0)
);

CREATE TABLE medium (
    id INTEGER PRIMARY KEY,
    name TEXT NOT NULL UNIQUE CHECK (length(trim(name)) > 0),
    coalescence TEXT NOT NULL DEFAULT 'coalescing'
        CHECK (coalescence IN ('coalescing', 'non-coalescing', 'viscous')),
    density_kg_m3 REAL CHECK (density_kg_m3 IS NULL OR (density_kg_m3 >= 500 AND density_kg_m3 <= 2500)),
    viscosity_pa_s REAL CHECK (viscosity_pa_s IS NULL OR (viscosity_pa_s > 0 AND viscosity_pa_s <= 1000)),
    surface_tension_n_m REAL CHECK (surface_tension_n_m IS NULL OR (surface_tension_n_m > 0 AND surface_tension_n_m <= 0.1)),
    notes TEXT NOT NULL DEFAULT '',
    created_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ', 'now')),
    updated_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ', 'now')),
    deleted_at TEXT,
    row_version INTEGER NOT NULL DEFAULT 1
);

CREATE TABLE medium_salt (
    id INTEGER PRIMARY KEY,
    medium_id INTEGER NOT NULL REFERENCES medium (id) ON DELETE CASCADE,
    salt TEXT NOT NULL CHECK (length(salt) > 0),
    concentration_mol_m3 REAL NOT NULL CHECK (concentration_mol_m3 >= 0 AND concentration_mol_m3 <= 10000),
    UNIQUE (medium_id, salt)
);

CREATE TABLE run (
    id INTEGER PRIMARY KEY,
    vessel_id INTEGER NOT NULL REFERENCES vessel (id),
    medium_id INTEGER NOT NULL REFERENCES medium (id),
    ref TEXT UNIQUE CHECK (ref IS NULL OR length(trim(ref)) > 0),  -- the lab's own run id
    run_at TEXT NOT NULL,  -- ISO 8601 date or date-time of the measurement
    speed_rps REAL NOT NULL CHECK (speed_rps > 0 AND speed_rps <= 100),
    gas_flow_mol_s REAL NOT NULL CHECK (gas_flow_mol_s >= 0 AND gas_flow_mol_s <= 1000),
    gas_flow_basis TEXT NOT NULL DEFAULT 'normal' CHECK (gas_flow_basis IN ('normal', 'actual', 'molar', 'vvm')),
    o2_fraction_in REAL NOT NULL DEFAULT 0.2095 CHECK (o2_fraction_in >= 0 AND o2_fraction_in <= 1),
    temperature_k REAL NOT NULL CHECK (temperature_k >= 273.15 AND temperature_k <= 423.15),
    head_pressure_pa REAL CHECK (head_pressure_pa IS NULL OR (head_pressure_pa > 0 AND head_pressure_pa <= 1e7)),
    power_measured_w REAL CHECK (power_measured_w IS NULL OR power_measured_w >= 0),
    torque_measured_n_m REAL CHECK (torque_measured_n_m IS NULL OR torque_measured_n_m >= 0),
    kla_per_s REAL CHECK (kla_per_s IS NULL OR (kla_per_s > 0 AND kla_per_s <= 10)),
    kla_stderr_per_s REAL CHECK (kla_stderr_per_s IS NULL OR kla_stderr_per_s >= 0),
    kla_method TEXT CHECK (kla_method IS NULL OR kla_method IN ('gassing-out', 'dynamic', 'gas-balance', 'sulfite', 'entered')),
    gas_holdup REAL CHECK (gas_holdup IS NULL OR (gas_holdup >= 0 AND gas_holdup < 1)),
    notes TEXT NOT NULL DEFAULT '',
    created_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ', 'now')),
    updated_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ', 'now')),
    deleted_at TEXT,
    row_version INTEGER NOT NULL DEFAULT 1
);
CREATE INDEX run_vessel ON run (vessel_id);
CREATE INDEX run_medium ON run (medium_id);

CREATE TABLE curve (
    id INTEGER PRIMARY KEY,
    run_id INTEGER NOT NULL REFERENCES run (id),
    kind TEXT NOT NULL DEFAULT 'gassing-out' CHECK (kind IN ('gassing-out', 'dynamic', 'probe-step')),
    n_samples INTEGER NOT NULL CHECK (n_samples >= 0),
    time_s BLOB NOT NULL,          -- little-endian float64 array
    do_values BLOB NOT NULL,       -- little-endian float64 array, in do_unit
    do_unit TEXT NOT NULL CHECK (do_unit IN ('mol/m3', 'mg/L', '%')),
    probe_tau_s REAL CHECK (probe_tau_s IS NULL OR probe_tau_s >= 0),
    gas_on_s REAL,
    window_low REAL CHECK (window_low IS NULL OR (window_low >= 0 AND window_low < 1)),
    window_high REAL CHECK (window_high IS NULL OR (window_high > 0 AND window_high <= 1)),
    fit_method TEXT,
    kla_per_s REAL,
    kla_stderr_per_s REAL,
    c_inf REAL,
    c0 REAL,
    analysed_at TEXT,
    analysis_json TEXT,
    notes TEXT NOT NULL DEFAULT '',
    created_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ', 'now')),
    deleted_at TEXT,
    row_version INTEGER NOT NULL DEFAULT 1,
    CHECK (window_low IS NULL OR window_high IS NULL OR window_low < window_high)
);
CREATE INDEX curve_run ON curve (run_id);

CREATE TABLE offgas (
    id INTEGER PRIMARY KEY,
    run_id INTEGER NOT NULL REFERENCES run (id),
    gas_flow_mol_s REAL NOT NULL CHECK (gas_flow_mol_s > 0),
    y_o2_in REAL NOT NULL CHECK (y_o2_in >= 0 AND y_o2_in <= 1),
    y_o2_out REAL NOT NULL CHECK (y_o2_out >= 0 AND y_o2_out <= 1),
    y_co2_in REAL NOT NULL DEFAULT 0.0004 CHECK (y_co2_in >= 0 AND y_co2_in <= 1),
    y_co2_out REAL NOT NULL CHECK (y_co2_out >= 0 AND y_co2_out <= 1),
    liquid_volume_m3 REAL NOT NULL CHECK (liquid_volume_m3 > 0),
    otr_mol_m3_s REAL,
    cer_mol_m3_s REAL,
    notes TEXT NOT NULL DEFAULT '',
    created_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ', 'now')),
    deleted_at TEXT,
    row_version INTEGER NOT NULL DEFAULT 1
);

CREATE TABLE flux (
    id INTEGER PRIMARY KEY,
    run_id INTEGER REFERENCES run (id),
    solute TEXT NOT NULL CHECK (length(solute) > 0),
    interfacial_area_m2 REAL NOT NULL CHECK (interfacial_area_m2 > 0),
    flux_mol_m2_s REAL NOT NULL,
    c_interface_mol_m3 REAL NOT NULL CHECK (c_interface_mol_m3 >= 0),
    c_bulk_mol_m3 REAL NOT NULL CHECK (c_bulk_mol_m3 >= 0),
    characteristic_length_m REAL NOT NULL CHECK (characteristic_length_m > 0),
    velocity_m_s REAL NOT NULL CHECK (velocity_m_s >= 0),
    temperature_k REAL NOT NULL CHECK (temperature_k >= 273.15 AND temperature_k <= 423.15),
    diffusivity_m2_s REAL CHECK (diffusivity_m2_s IS NULL OR diffusivity_m2_s > 0),
    density_kg_m3 REAL CHECK (density_kg_m3 IS NULL OR density_kg_m3 > 0),
    viscosity_pa_s REAL CHECK (viscosity_pa_s IS NULL OR viscosity_pa_s > 0),
    notes TEXT NOT NULL DEFAULT '',
    created_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ', 'now')),
    deleted_at TEXT,
    row_version INTEGER NOT NULL DEFAULT 1,
    CHECK (c_interface_mol_m3 <> c_bulk_mol_m3)
);

CREATE TABLE fit (
    id INTEGER PRIMARY KEY,
    name TEXT NOT NULL UNIQUE CHECK (length(trim(name)) > 0),
    kind TEXT NOT NULL CHECK (kind IN ('kla', 'sherwood')),
    form TEXT NOT NULL,
    method TEXT NOT NULL,
    weights TEXT NOT NULL DEFAULT 'none',
    selection TEXT NOT NULL DEFAULT '',   -- the --where expression that chose the runs
    model_json TEXT NOT NULL,             -- parameters, covariance, domain, statistics
    package_version TEXT NOT NULL,
    stale INTEGER NOT NULL DEFAULT 0 CHECK (stale IN (0, 1)),
    created_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ', 'now')),
    deleted_at TEXT,
    row_version INTEGER NOT NULL DEFAULT 1
);

CREATE TABLE fit_run (
    fit_id INTEGER NOT NULL REFERENCES fit (id) ON DELETE CASCADE,
    run_id INTEGER NOT NULL REFERENCES run (id),
    PRIMARY KEY (fit_id, run_id)
);

-- a fit is stale once a run it used changes: shown to the user, never silently refitted
CREATE TRIGGER fit_stale_on_run_edit AFTER UPDATE ON run
WHEN OLD.row_version <> NEW.row_version
BEGIN
    UPDATE fit SET stale = 1 WHERE id IN (SELECT fit_id FROM fit_run WHERE run_id = NEW.id);
END;

CREATE TABLE study (
    id INTEGER PRIMARY KEY,
    name TEXT NOT NULL UNIQUE CHECK (length(trim(name)) > 0),
    kind TEXT NOT NULL CHECK (kind IN ('scale', 'design')),
    inputs_json TEXT NOT NULL,
    results_json TEXT NOT NULL,
    fit_id INTEGER REFERENCES fit (id),
    package_version TEXT NOT NULL,
    created_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ', 'now')),
    deleted_at TEXT,
    row_version INTEGER NOT NULL DEFAULT 1
);

CREATE TABLE audit_log (
    id INTEGER PRIMARY KEY,
    at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ', 'now')),
    actor TEXT NOT NULL DEFAULT '',
    table_name TEXT NOT NULL,
    record_id INTEGER NOT NULL,
    action TEXT NOT NULL CHECK (action IN ('insert', 'update', 'delete', 'restore', 'import')),
    old_json TEXT,
    new_json TEXT
);
CREATE INDEX audit_record ON audit_log (table_name, record_id);

-- the runs as people filter and read them: one row per live run with its vessel and medium
CREATE VIEW run_view AS
SELECT r.id AS id, r.ref AS ref, v.name AS vessel, m.name AS medium, m.coalescence AS coalescence,
       r.run_at AS run_at, r.speed_rps AS speed_rps, r.gas_flow_mol_s AS gas_flow_mol_s,
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
