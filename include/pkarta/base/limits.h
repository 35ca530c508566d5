// The model's stated limits, in one place: every range check and warning uses these.
#pragma once

namespace pkarta {

/// Upper end of the Davies equation's range, mol/L (Davies, Ion Association, 1962: "up to
/// about 0.5"; docs/model.md, "Activity").
inline constexpr double kDaviesMaxIonicStrength = 0.5;
/// Highest ionic strength at which the SIT and Truesdell-Jones models were checked against
/// published buffer tables, mol/L (README, "Accuracy").
inline constexpr double kCheckedMaxIonicStrength = 0.6;
/// Temperature range of the water and pKa(T) data, °C (docs/data-sources.md).
inline constexpr double kDataMinTemperatureC = 0.0;
inline constexpr double kDataMaxTemperatureC = 60.0;

}  // namespace pkarta
