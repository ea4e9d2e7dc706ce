package compare

// Cautions is the safety notice that the README, the help of the test
// commands and every report carry. It is common practice for rig and drop
// testing, not a procedure: it defers to local codes, the rig's own
// procedures and licensed practice.
const Cautions = `Safety: rig and drop tests can hurt people.
  - Keep the exclusion zone clear, with interlocked guarding and emergency stops
    in reach (ISO 13850). Lock out and bleed the hydraulics, accumulators too,
    before anyone approaches the rig.
  - Set displacement, velocity, acceleration and force limits in the controller
    and in the hardware; ramp the drive up from a low level.
  - Restrain the vehicle so the wheels cannot walk off the pans; keep pan
    acceleration under 1 g unless the wheels are clamped. Secure all ballast.
  - No occupants unless approved, and then within ISO 2631-1 limits. Mind the
    high-voltage and fire hazards of electric vehicles.
  - Drops: small heights, a controlled release, nobody under or beside the car,
    no bump-stop contact.
  Results are engineering estimates, not a certification. Local codes, the
  rig's own procedures and licensed practice take precedence over this tool.`
