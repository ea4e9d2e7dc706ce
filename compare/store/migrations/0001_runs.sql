-- The fixed tables of the contract's "Campaigns" section. Outside tools query
-- them: columns may be added by later migrations, never renamed or dropped.
-- {{timestamp}} is the dialect's time type (see dialect.go).

CREATE TABLE runs (
    run_key      TEXT PRIMARY KEY,
    log_sha256   TEXT NOT NULL,
    log_path     TEXT NOT NULL,
    setup_sha256 TEXT NOT NULL,
    car          TEXT NOT NULL,
    run          TEXT NOT NULL,
    test         TEXT NOT NULL,
    tool_version TEXT NOT NULL,
    analysed_at  {{timestamp}} NOT NULL,
    verdict      TEXT NOT NULL,
    error        TEXT NOT NULL,
    result_json  TEXT
);

CREATE INDEX runs_car ON runs (car, analysed_at);

CREATE TABLE modes (
    run_key                    TEXT NOT NULL REFERENCES runs (run_key) ON DELETE CASCADE,
    ordinal                    INTEGER NOT NULL,
    label                      TEXT NOT NULL,
    natural_frequency_hz       DOUBLE PRECISION NOT NULL,
    natural_frequency_sd_hz    DOUBLE PRECISION,
    damping_ratio              DOUBLE PRECISION NOT NULL,
    damping_ratio_sd           DOUBLE PRECISION,
    node_m                     DOUBLE PRECISION,
    pitch_per_bounce_rad_per_m DOUBLE PRECISION,
    flagged                    BOOLEAN NOT NULL,
    PRIMARY KEY (run_key, ordinal)
);

CREATE TABLE rates (
    run_key                TEXT PRIMARY KEY REFERENCES runs (run_key) ON DELETE CASCADE,
    front_rate_n_per_m     DOUBLE PRECISION NOT NULL,
    rear_rate_n_per_m      DOUBLE PRECISION NOT NULL,
    front_damping_ns_per_m DOUBLE PRECISION,
    rear_damping_ns_per_m  DOUBLE PRECISION,
    front_rate_sd_n_per_m  DOUBLE PRECISION,
    rear_rate_sd_n_per_m   DOUBLE PRECISION
);

CREATE TABLE run_meta (
    run_key TEXT NOT NULL REFERENCES runs (run_key) ON DELETE CASCADE,
    key     TEXT NOT NULL,
    value   TEXT NOT NULL,
    PRIMARY KEY (run_key, key)
);
