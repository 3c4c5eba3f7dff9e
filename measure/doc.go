// Package measure is fieldtab's engineering core: unit conversions, moist-air
// psychrometrics, air- and water-side capacity, valve flow, pitot traverses,
// outlet flow, fan laws, tolerance checks and manufacturer performance tables.
//
// The package is pure: it does no I/O, keeps no state beyond constant tables, and
// imports only the standard library. Every exported function says its units and
// the method it follows; input outside a method's valid range returns an
// *InputError naming the input and the range, never NaN and never a panic.
//
// Two conventions run through it:
//   - Quantities with an exact linear conversion (flow, pressure, power, length,
//     area, velocity, density, mass flow, temperature) have named types stored in
//     SI base units, built with constructors such as CFM(500) and read back with
//     methods such as q.CFM(). The types keep cfm from being added to L/s.
//   - Psychrometrics follows ASHRAE Handbook—Fundamentals (2017) ch. 1, which gives
//     separate IP and SI equations whose constants and datums differ (enthalpy is
//     zero at 0 °F in IP and at 0 °C in SI). Moist-air states are therefore
//     computed in one UnitSystem and carry their values in that system's units.
package measure
