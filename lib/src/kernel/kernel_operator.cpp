// Application of the discretised kernel (matrix-free) and its assembly on request.
//
// With S(x) = sum_k p_k b_k w . x_k (seeds produced) and R = phi S + sum_d r_d x_d
// (seed-equivalents on the recruitment route), one application is
//   y_{next(k)} += P_k x_k                          B n^2     survival-growth
//   y_{entry(m)} += R a_m e_m c_m                   O(M n)    recruitment (rank one)
//   y_d += sigma_d S + sum T_{dd'} x_{d'} + inflows  O(D^2 + n) discrete stages
//   y_k += rate_f x_d c_f                            O(n)      direct stage -> class flows
// and the transpose walks the same terms backwards (Ellner & Rees 2006 for the rank-one
// structure of fecundity; the split into P and F follows Ellner, Childs & Rees 2016 ch. 3).
#include <stdexcept>

#include "safesite/kernel/kernel_operator.hpp"

namespace safesite::kernel {

namespace {
using Vec = Eigen::Map<Eigen::VectorXd>;
using CVec = Eigen::Map<const Eigen::VectorXd>;
}  // namespace

Eigen::Index KernelOperator::group_offset(std::size_t group) const {
    if (group >= group_count()) throw std::out_of_range("KernelOperator: group index");
    if (group < class_count()) return static_cast<Eigen::Index>(group * m_n);
    return m_stage_offset + static_cast<Eigen::Index>(group - class_count());
}

Eigen::Index KernelOperator::group_size(std::size_t group) const {
    if (group >= group_count()) throw std::out_of_range("KernelOperator: group index");
    return group < class_count() ? static_cast<Eigen::Index>(m_n) : 1;
}

std::string KernelOperator::group_name(std::size_t group) const {
    if (group >= group_count()) throw std::out_of_range("KernelOperator: group index");
    return group < class_count() ? m_class_names[group] : m_stage_names[group - class_count()];
}

double KernelOperator::recruitment_input(const double* x) const {
    const auto n = static_cast<Eigen::Index>(m_n);
    double seeds = 0.0;
    for (std::size_t k = 0; k < class_count(); ++k)
        seeds += m_seeds[k].dot(CVec(x + static_cast<Eigen::Index>(k) * n, n));
    const CVec xs(x + m_stage_offset, static_cast<Eigen::Index>(stage_count()));
    return m_fresh * seeds + m_stage_recruitment.dot(xs);
}

Eigen::VectorXd KernelOperator::offspring_per_seed() const {
    const auto n = static_cast<Eigen::Index>(m_n);
    Eigen::VectorXd u = Eigen::VectorXd::Zero(m_dim);
    for (std::size_t m = 0; m < microsite_count(); ++m)
        u.segment(static_cast<Eigen::Index>(m_entry[m]) * n, n) +=
            (m_fresh * m_arrival[m] * m_establishment[m]) * m_recruit_shape[m];
    u.tail(static_cast<Eigen::Index>(stage_count())) = m_seed_input;
    return u;
}

Eigen::VectorXd KernelOperator::seeds_per_individual() const {
    const auto n = static_cast<Eigen::Index>(m_n);
    Eigen::VectorXd s = Eigen::VectorXd::Zero(m_dim);
    for (std::size_t k = 0; k < class_count(); ++k)
        s.segment(static_cast<Eigen::Index>(k) * n, n) = m_seeds[k];
    return s;
}

void KernelOperator::perform_op(const double* x, double* y) const {
    ++m_applications;
    apply_impl(KernelPart::all, x, y);
}

void KernelOperator::perform_transposed_op(const double* x, double* y) const {
    ++m_applications;
    apply_transposed_impl(KernelPart::all, x, y);
}

void KernelOperator::apply(KernelPart part, const double* x, double* y) const {
    apply_impl(part, x, y);
}

void KernelOperator::apply_transposed(KernelPart part, const double* x, double* y) const {
    apply_transposed_impl(part, x, y);
}

void KernelOperator::apply_impl(KernelPart part, const double* x, double* y) const {
    const auto n = static_cast<Eigen::Index>(m_n);
    const auto D = static_cast<Eigen::Index>(stage_count());
    const bool with_p = part != KernelPart::reproduction;
    const bool with_f = part != KernelPart::survival_growth;
    Vec(y, m_dim).setZero();
    const CVec xs(x + m_stage_offset, D);
    Vec ys(y + m_stage_offset, D);

    // Seeds produced, S = sum_k sum_j p b w x.
    double seeds = 0.0;
    for (std::size_t k = 0; k < class_count(); ++k) {
        const auto off = static_cast<Eigen::Index>(k) * n;
        if (with_p) {
            Vec(y + static_cast<Eigen::Index>(m_next[k]) * n, n).noalias() +=
                m_P[k] * CVec(x + off, n);
        }
        seeds += m_seeds[k].dot(CVec(x + off, n));
    }
    double route = 0.0;
    if (with_f) {
        route += m_fresh * seeds;
        ys.noalias() += seeds * m_seed_input;
    }
    if (with_p && D > 0) {
        route += m_stage_recruitment.dot(xs);
        ys.noalias() += m_T * xs;
        for (const Flow& f : m_flows)
            Vec(y + static_cast<Eigen::Index>(f.target) * n, n) +=
                (f.rate * xs[static_cast<Eigen::Index>(f.stage)]) * f.shape;
        for (const Inflow& f : m_inflows)
            ys[static_cast<Eigen::Index>(f.stage)] +=
                f.weighted_rate.dot(CVec(x + static_cast<Eigen::Index>(f.source) * n, n));
    }
    if (route != 0.0) {
        for (std::size_t m = 0; m < microsite_count(); ++m)
            Vec(y + static_cast<Eigen::Index>(m_entry[m]) * n, n) +=
                (route * m_arrival[m] * m_establishment[m]) * m_recruit_shape[m];
    }
}

void KernelOperator::apply_transposed_impl(KernelPart part, const double* x, double* y) const {
    const auto n = static_cast<Eigen::Index>(m_n);
    const auto D = static_cast<Eigen::Index>(stage_count());
    const bool with_p = part != KernelPart::reproduction;
    const bool with_f = part != KernelPart::survival_growth;
    Vec(y, m_dim).setZero();
    const CVec xs(x + m_stage_offset, D);
    Vec ys(y + m_stage_offset, D);

    // Value of one recruitment-route seed-equivalent: Q = sum_m a e c_m . x_entry(m).
    double q = 0.0;
    for (std::size_t m = 0; m < microsite_count(); ++m)
        q += m_arrival[m] * m_establishment[m] *
             m_recruit_shape[m].dot(CVec(x + static_cast<Eigen::Index>(m_entry[m]) * n, n));

    // Value of one seed: phi Q + sum_d sigma_d x_d.
    const double seed_value = with_f ? m_fresh * q + m_seed_input.dot(xs) : 0.0;
    for (std::size_t k = 0; k < class_count(); ++k) {
        Vec yk(y + static_cast<Eigen::Index>(k) * n, n);
        if (with_p)
            yk.noalias() +=
                m_P[k].transpose() * CVec(x + static_cast<Eigen::Index>(m_next[k]) * n, n);
        if (seed_value != 0.0) yk += seed_value * m_seeds[k];
    }
    if (with_p && D > 0) {
        ys.noalias() += m_T.transpose() * xs;
        ys += q * m_stage_recruitment;
        for (const Flow& f : m_flows)
            ys[static_cast<Eigen::Index>(f.stage)] +=
                f.rate * f.shape.dot(CVec(x + static_cast<Eigen::Index>(f.target) * n, n));
        for (const Inflow& f : m_inflows)
            Vec(y + static_cast<Eigen::Index>(f.source) * n, n) +=
                xs[static_cast<Eigen::Index>(f.stage)] * f.weighted_rate;
    }
}

Eigen::MatrixXd KernelOperator::block(std::size_t to, std::size_t from, KernelPart part) const {
    const Eigen::Index rows = group_size(to);
    const Eigen::Index cols = group_size(from);
    const bool with_p = part != KernelPart::reproduction;
    const bool with_f = part != KernelPart::survival_growth;
    Eigen::MatrixXd out = Eigen::MatrixXd::Zero(rows, cols);
    const std::size_t B = class_count();
    const bool to_class = to < B;
    const bool from_class = from < B;

    if (to_class && from_class) {
        if (with_p && m_next[from] == to) out += m_P[from];
        if (with_f)
            for (std::size_t m = 0; m < microsite_count(); ++m)
                if (m_entry[m] == to)
                    out.noalias() += (m_fresh * m_arrival[m] * m_establishment[m]) *
                                     m_recruit_shape[m] * m_seeds[from].transpose();
    } else if (to_class && !from_class) {
        const std::size_t d = from - B;
        if (with_p) {
            for (std::size_t m = 0; m < microsite_count(); ++m)
                if (m_entry[m] == to)
                    out.col(0) += (m_stage_recruitment[static_cast<Eigen::Index>(d)] *
                                   m_arrival[m] * m_establishment[m]) *
                                  m_recruit_shape[m];
            for (const Flow& f : m_flows)
                if (f.stage == d && f.target == to) out.col(0) += f.rate * f.shape;
        }
    } else if (!to_class && from_class) {
        const std::size_t d = to - B;
        if (with_f)
            out.row(0) += m_seed_input[static_cast<Eigen::Index>(d)] * m_seeds[from].transpose();
        if (with_p)
            for (const Inflow& f : m_inflows)
                if (f.stage == d && f.source == from) out.row(0) += f.weighted_rate.transpose();
    } else {
        if (with_p)
            out(0, 0) = m_T(static_cast<Eigen::Index>(to - B), static_cast<Eigen::Index>(from - B));
    }
    return out;
}

Eigen::MatrixXd KernelOperator::to_dense(KernelPart part) const {
    Eigen::MatrixXd out(m_dim, m_dim);
    for (std::size_t to = 0; to < group_count(); ++to)
        for (std::size_t from = 0; from < group_count(); ++from)
            out.block(group_offset(to), group_offset(from), group_size(to), group_size(from)) =
                block(to, from, part);
    return out;
}

}  // namespace safesite::kernel
