#include "safesite/kernel/mesh.hpp"

#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include <boost/math/special_functions/legendre.hpp>

#include "core/number_text.hpp"
#include "safesite/kernel/kernel_error.hpp"

namespace safesite::kernel {

namespace {

std::string number(double x) { return core::number_text(x, 17); }

}  // namespace

Mesh::Mesh(double lower, double upper, std::size_t size, QuadratureRule rule)
    : m_lower(lower), m_upper(upper), m_rule(rule) {
    if (!std::isfinite(lower))
        throw KernelError("mesh", "lower", KernelError::npos,
                          "lower bound L = " + number(lower) + " is not finite");
    if (!std::isfinite(upper))
        throw KernelError("mesh", "upper", KernelError::npos,
                          "upper bound U = " + number(upper) + " is not finite");
    if (!(lower < upper))
        throw KernelError("mesh", "upper", KernelError::npos,
                          "need L < U, got L = " + number(lower) + ", U = " + number(upper));
    if (size < 2)
        throw KernelError("mesh", "size", KernelError::npos,
                          "need at least 2 mesh points, got " + std::to_string(size));

    const auto n = static_cast<Eigen::Index>(size);
    m_points.resize(n);
    m_weights.resize(n);
    const double width = upper - lower;

    if (rule == QuadratureRule::midpoint) {
        const double h = width / static_cast<double>(size);
        for (Eigen::Index i = 0; i < n; ++i) {
            m_points[i] = lower + (static_cast<double>(i) + 0.5) * h;
            m_weights[i] = h;
        }
        return;
    }

    // Gauss–Legendre. Boost.Math gives the non-negative zeros x of P_n in ascending order
    // (0 first when n is odd). The weight of a node on [-1, 1] is 2 / ((1 - x^2) P_n'(x)^2)
    // (Abramowitz & Stegun 25.4.29, from memory); on [L, U] both are mapped affinely:
    // z = (L + U)/2 + x (U - L)/2, w_z = w_x (U - L)/2.
    const int order = static_cast<int>(size);
    const std::vector<double> zeros = boost::math::legendre_p_zeros<double>(order);
    const double mid = 0.5 * (lower + upper);
    const double half = 0.5 * width;
    auto weight_of = [order](double x) {
        const double d = boost::math::legendre_p_prime<double>(order, x);
        return 2.0 / ((1.0 - x * x) * d * d);
    };
    // Fill from the middle outwards: node k of the positive half goes to n/2 + k (odd n: the
    // zero node sits at index n/2), its mirror image to the symmetric position.
    const Eigen::Index centre = n / 2;
    const bool odd = (n % 2) == 1;
    for (std::size_t k = 0; k < zeros.size(); ++k) {
        const double x = zeros[k];
        const double wx = weight_of(x);
        if (odd) {
            const Eigen::Index up = centre + static_cast<Eigen::Index>(k);
            const Eigen::Index down = centre - static_cast<Eigen::Index>(k);
            m_points[up] = mid + x * half;
            m_weights[up] = wx * half;
            m_points[down] = mid - x * half;
            m_weights[down] = wx * half;
        } else {
            const Eigen::Index up = centre + static_cast<Eigen::Index>(k);
            const Eigen::Index down = centre - 1 - static_cast<Eigen::Index>(k);
            m_points[up] = mid + x * half;
            m_weights[up] = wx * half;
            m_points[down] = mid - x * half;
            m_weights[down] = wx * half;
        }
    }
}

}  // namespace safesite::kernel
