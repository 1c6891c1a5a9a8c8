#pragma once
/// \file version.hpp
/// Version of the safesite library, written into every output folder.

#include <string>

namespace safesite {

/// The library version as "major.minor.patch".
std::string version();

}  // namespace safesite
