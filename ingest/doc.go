// Package ingest reads what a test engineer brings to ridemodes: the setup
// file (TOML) that describes the vehicle, its sensors and the rig inputs, and
// the CSV logs of vertical accelerations. Everything leaves this package in SI
// units (m, s, kg, N, rad; accelerations in m/s^2).
//
// Contributors: read DEVELOPERS.md at the top of the module first (house rules:
// no git writes by helpers, do not edit go.mod, original wording only).
package ingest
