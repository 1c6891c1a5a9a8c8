#include "safesite/version.hpp"

namespace safesite {

std::string version() { return "0.1.0"; }

}  // namespace safesite
