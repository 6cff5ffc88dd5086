// The rank decision and the solve on the small factor (qr_steps.hpp).
#include "estimation/qr_steps.hpp"

#include <cmath>
#include <limits>

namespace moderato::detail {

using LD = long double;

// Numerical rank from a pivoted QR of the small factor: the kept columns
// (ascending), the aliased ones and the rank go into `out`.
void decide_rank(const MatL& Raug, Eigen::Index p, double tolerance, LeastSquaresResult& out) {
    MatL Rx = Raug.topLeftCorner(p, p);
    Eigen::ColPivHouseholderQR<MatL> piv(Rx);
    const MatL& Rp = piv.matrixQR();
    LD biggest = 0;
    for (Eigen::Index k = 0; k < p; ++k) biggest = std::max(biggest, std::abs(Rp(k, k)));
    int rank = 0;
    for (Eigen::Index k = 0; k < p; ++k)
        if (std::abs(Rp(k, k)) > static_cast<LD>(tolerance) * biggest) ++rank;
        else break;
    const auto& perm = piv.colsPermutation().indices();
    std::vector<int> kept(perm.data(), perm.data() + rank);
    std::sort(kept.begin(), kept.end());
    for (int j = 0; j < p; ++j)
        if (!std::binary_search(kept.begin(), kept.end(), j)) out.aliased.push_back(j);
    out.rank = rank;
    out.kept = kept;
}

// Solves the full-rank problem on the kept columns: the coefficients (NaN for
// aliased columns) and the inverse factor go into `out`; the coefficients are
// also returned in long double (0 for aliased columns) for the residuals.
VecL solve_kept(const MatL& Raug, const std::vector<double>& scale, LeastSquaresResult& out) {
    const Eigen::Index p = Raug.cols() - 1;
    const std::vector<int>& kept = out.kept;
    const Eigen::Index k = out.rank;
    MatL Bk(p + 1, k + 1);
    for (Eigen::Index c = 0; c < k; ++c) Bk.col(c) = Raug.col(kept[static_cast<std::size_t>(c)]);
    Bk.col(k) = Raug.col(p);
    MatL R2 = triangular_factor(Bk);
    const MatL Rk = R2.topLeftCorner(k, k);
    const VecL c = R2.col(k).head(k);
    const VecL bs = Rk.triangularView<Eigen::Upper>().solve(c);
    const MatL Rinv = Rk.triangularView<Eigen::Upper>().solve(MatL::Identity(k, k));

    out.coef = Eigen::VectorXd::Constant(p, std::numeric_limits<double>::quiet_NaN());
    VecL coefL = VecL::Zero(p);
    out.inverse_factor.resize(k, k);
    for (Eigen::Index a = 0; a < k; ++a) {
        const LD s = scale[static_cast<std::size_t>(kept[static_cast<std::size_t>(a)])];
        coefL[kept[static_cast<std::size_t>(a)]] = bs[a] / s;
        out.coef[kept[static_cast<std::size_t>(a)]] = static_cast<double>(bs[a] / s);
        for (Eigen::Index b = 0; b < k; ++b) out.inverse_factor(a, b) = static_cast<double>(Rinv(a, b) / s);
    }
    return coefL;
}

}  // namespace moderato::detail
