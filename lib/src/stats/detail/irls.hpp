#pragma once
// Iteratively reweighted least squares for one GLM with fixed dispersion parameters.
// Private to lib/src/stats.

#include <Eigen/Core>

#include "safesite/stats/family.hpp"

namespace safesite::stats::detail {

/// One GLM problem on full-rank columns. For binomial, y holds successes and m trials; the
/// fit works on proportions y/m with weights w·m. `w` may include 1/σᵢ² (gaussian_spread).
struct IrlsProblem {
    const Eigen::MatrixXd* X = nullptr;  // n × q, full column rank on rows with w > 0
    Eigen::VectorXd y;
    Eigen::VectorXd m;                   // trials (binomial), else 1
    Eigen::VectorXd w;                   // prior weights (≥ 0)
    Eigen::VectorXd offset;
    Family family = Family::gaussian;
    Link link = Link::identity;
    double theta = 1.0;                  // negbin
};

struct IrlsResult {
    Eigen::VectorXd beta;
    Eigen::VectorXd eta;
    Eigen::VectorXd mu;                  // mean of y/m (proportion for binomial)
    Eigen::VectorXd last_step;           // β_k − β_{k−1} of the last iteration
    double deviance = 0.0;
    double last_change = 0.0;            // relative deviance change of the last iteration
    int iterations = 0;
    bool converged = false;
};

/// Σ weighted unit deviances (binomial on proportions with weight w·m).
double deviance(const IrlsProblem& p, const Eigen::VectorXd& mu);

/// Fit by IRLS from `start` (size q; empty = family starting values), with step halving when
/// the deviance is not finite or increases. Each weighted least-squares step is solved by a
/// column-pivoting Householder QR.
IrlsResult irls(const IrlsProblem& p, const Eigen::VectorXd& start, int max_iterations,
                double tolerance);

/// Unscaled covariance (Xᵀ W X)⁻¹ at η, W the IRLS working weights, by QR of √W X.
Eigen::MatrixXd unscaled_covariance(const IrlsProblem& p, const Eigen::VectorXd& eta);

/// Columns of X (in order) that are linear combinations of earlier columns on the rows with
/// positive weight: sequential Gram–Schmidt with re-orthogonalisation, a column counted as
/// aliased when its residual norm is ≤ 1e-7 of its norm (the tolerance of common practice).
std::vector<bool> aliased_columns(const Eigen::MatrixXd& X, const Eigen::VectorXd& w);

}  // namespace safesite::stats::detail
