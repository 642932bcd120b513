#pragma once
// Schema migrations of the catalog. Each entry is frozen once released: a change is a new entry.

#include <array>
#include <string_view>

namespace coilsieve::catalog::schema {

// Migration 1: sources, inductors, diodes. Column names are the field names (catalog/fields.cpp);
// CHECK constraints reject rows no real part can have.
inline constexpr std::string_view v1 = R"sql(
CREATE TABLE source (
  id INTEGER PRIMARY KEY,
  name TEXT NOT NULL CHECK (length(name) > 0),
  part_kind TEXT NOT NULL CHECK (part_kind IN ('inductor', 'diode')),
  kind TEXT NOT NULL CHECK (kind IN ('starter', 'import')),
  created TEXT NOT NULL,
  file_name TEXT NOT NULL,
  sha256 TEXT NOT NULL CHECK (length(sha256) = 64),
  row_count INTEGER NOT NULL CHECK (row_count >= 0),
  UNIQUE (name, part_kind)
);
CREATE TABLE inductor (
  pk INTEGER PRIMARY KEY,
  source_id INTEGER NOT NULL REFERENCES source(id) ON DELETE CASCADE,
  assumed TEXT NOT NULL DEFAULT '',
  "id" TEXT NOT NULL CHECK (length("id") > 0),
  family TEXT NOT NULL,
  inductance REAL NOT NULL CHECK (inductance > 0),
  tolerance REAL NOT NULL CHECK (tolerance > 0 AND tolerance < 1),
  dcr_typ REAL NOT NULL CHECK (dcr_typ > 0),
  dcr_max REAL NOT NULL CHECK (dcr_max >= dcr_typ),
  dcr_temperature REAL NOT NULL CHECK (dcr_temperature > 0),
  isat REAL NOT NULL CHECK (isat > 0),
  sat_drop REAL NOT NULL CHECK (sat_drop > 0 AND sat_drop < 1),
  irms REAL NOT NULL CHECK (irms > 0),
  irms_rise REAL NOT NULL CHECK (irms_rise > 0),
  srf REAL CHECK (srf IS NULL OR srf > 0),
  shape TEXT NOT NULL CHECK (shape IN ('hard', 'soft')),
  core_k REAL NOT NULL CHECK (core_k >= 0),
  core_alpha REAL NOT NULL CHECK (core_alpha >= 0),
  core_beta REAL NOT NULL CHECK (core_beta >= 0),
  b_sat REAL NOT NULL CHECK (b_sat > 0),
  core_volume REAL NOT NULL CHECK (core_volume >= 0),
  ac_factor REAL NOT NULL CHECK (ac_factor >= 1),
  t_max REAL NOT NULL CHECK (t_max > 0),
  mounting TEXT NOT NULL CHECK (mounting IN ('smd', 'tht')),
  length REAL NOT NULL CHECK (length >= 0),
  width REAL NOT NULL CHECK (width >= 0),
  height REAL NOT NULL CHECK (height >= 0),
  mass REAL CHECK (mass IS NULL OR mass > 0),
  price REAL CHECK (price IS NULL OR price >= 0),
  currency TEXT,
  notes TEXT,
  UNIQUE (source_id, "id")
);
CREATE INDEX inductor_inductance ON inductor(inductance);
CREATE INDEX inductor_isat ON inductor(isat);
-- UNIQUE (source_id, id) also indexes the source; a lookup by id alone scans (rare, ~10 ms).
CREATE TABLE diode (
  pk INTEGER PRIMARY KEY,
  source_id INTEGER NOT NULL REFERENCES source(id) ON DELETE CASCADE,
  assumed TEXT NOT NULL DEFAULT '',
  "id" TEXT NOT NULL CHECK (length("id") > 0),
  technology TEXT NOT NULL
    CHECK (technology IN ('schottky', 'sic-schottky', 'ultrafast', 'fast', 'standard')),
  vrrm REAL NOT NULL CHECK (vrrm > 0),
  if_avg REAL NOT NULL CHECK (if_avg > 0),
  ifsm REAL CHECK (ifsm IS NULL OR ifsm > 0),
  vf1 REAL CHECK (vf1 IS NULL OR vf1 > 0),
  if1 REAL CHECK (if1 IS NULL OR if1 > 0),
  t1 REAL CHECK (t1 IS NULL OR t1 > 0),
  vf2 REAL CHECK (vf2 IS NULL OR vf2 > 0),
  if2 REAL CHECK (if2 IS NULL OR if2 > 0),
  t2 REAL CHECK (t2 IS NULL OR t2 > 0),
  vf3 REAL CHECK (vf3 IS NULL OR vf3 > 0),
  if3 REAL CHECK (if3 IS NULL OR if3 > 0),
  t3 REAL CHECK (t3 IS NULL OR t3 > 0),
  spice_is REAL CHECK (spice_is IS NULL OR spice_is > 0),
  spice_n REAL CHECK (spice_n IS NULL OR spice_n > 0),
  spice_rs REAL CHECK (spice_rs IS NULL OR spice_rs >= 0),
  spice_eg REAL CHECK (spice_eg IS NULL OR spice_eg > 0),
  spice_xti REAL,
  cj REAL CHECK (cj IS NULL OR cj > 0),
  cj_vr REAL CHECK (cj_vr IS NULL OR cj_vr >= 0),
  cjo REAL CHECK (cjo IS NULL OR cjo > 0),
  vj REAL CHECK (vj IS NULL OR vj > 0),
  m REAL CHECK (m IS NULL OR (m > 0 AND m < 1)),
  trr REAL CHECK (trr IS NULL OR trr >= 0),
  qrr REAL CHECK (qrr IS NULL OR qrr >= 0),
  recovery_if REAL CHECK (recovery_if IS NULL OR recovery_if > 0),
  tt REAL CHECK (tt IS NULL OR tt >= 0),
  ir REAL CHECK (ir IS NULL OR ir >= 0),
  ir_vr REAL CHECK (ir_vr IS NULL OR ir_vr > 0),
  ir_temperature REAL CHECK (ir_temperature IS NULL OR ir_temperature > 0),
  rth_ja REAL NOT NULL CHECK (rth_ja > 0),
  tj_max REAL NOT NULL CHECK (tj_max > 0),
  package TEXT,
  length REAL NOT NULL CHECK (length >= 0),
  width REAL NOT NULL CHECK (width >= 0),
  height REAL NOT NULL CHECK (height >= 0),
  price REAL CHECK (price IS NULL OR price >= 0),
  currency TEXT,
  notes TEXT,
  CHECK (vf1 IS NOT NULL OR (spice_is IS NOT NULL AND spice_n IS NOT NULL)),
  UNIQUE (source_id, "id")
);
CREATE INDEX diode_vrrm ON diode(vrrm);
CREATE INDEX diode_if_avg ON diode(if_avg);
)sql";

// Migration 2: saved trade studies (written by the studies code through catalog/sqlite.hpp).
inline constexpr std::string_view v2 = R"sql(
CREATE TABLE study (
  id INTEGER PRIMARY KEY,
  name TEXT UNIQUE NOT NULL CHECK (length(name) > 0),
  parent_id INTEGER REFERENCES study(id) ON DELETE SET NULL,
  created TEXT NOT NULL,
  design_json TEXT NOT NULL,
  options_json TEXT NOT NULL,
  catalog_fingerprint TEXT NOT NULL,
  results_json TEXT NOT NULL
);
CREATE INDEX study_parent ON study(parent_id);
)sql";

inline constexpr std::array<std::string_view, 2> migrations{v1, v2};

} // namespace coilsieve::catalog::schema
