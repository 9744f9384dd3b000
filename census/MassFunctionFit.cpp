#include "census/MassFunctionFit.h"

#include "census/Fractions.h"
#include "photometry/ModelPhotometry.h"
#include "photometry/base/OptionChecks.h"

#include <Eigen/Dense>
#include <boost/math/special_functions/gamma.hpp>

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>
#include <numeric>

namespace starcensus::census {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr std::size_t kParameters = 3;

// P(lo <= M < hi) for a Gaussian of mean abs_g and width scatter (a step function without scatter).
double binProbability(double lo, double hi, double abs_g, double scatter) {
    if (!(scatter > 0.0)) {
        return abs_g >= lo && abs_g < hi ? 1.0 : 0.0;
    }
    const double scale = scatter * std::numbers::sqrt2;
    return 0.5 * (std::erfc((lo - abs_g) / scale) - std::erfc((hi - abs_g) / scale));
}

bool insideBounds(ImfFamily family, const Eigen::Vector3d& theta) {
    return parametersValid(family, {theta.data(), kParameters});
}

// Expected counts mu(theta) = density * K * shares and the Poisson log-likelihood of the counts.
class BinnedLikelihood {
  public:
    BinnedLikelihood(const LuminosityModel& model, Eigen::MatrixXd response, Eigen::VectorXd counts,
                     ImfFamily family, const ImfSettings& base)
        : model_(model), response_(std::move(response)), counts_(std::move(counts)), family_(family),
          base_(base) {
        for (Eigen::Index i = 0; i < counts_.size(); ++i) {
            log_factorials_ += std::lgamma(counts_[i] + 1.0);
        }
    }

    Eigen::VectorXd expected(const Eigen::Vector3d& theta) const {
        const InitialMassFunction imf(imfWithParameters(family_, base_, {theta.data(), kParameters}));
        const std::vector<double> shares = model_.cellShares(imf);
        return theta[0] * (response_ * Eigen::Map<const Eigen::VectorXd>(
                                           shares.data(), static_cast<Eigen::Index>(shares.size())));
    }

    double logLikelihood(const Eigen::VectorXd& mu) const {
        double sum = -log_factorials_;
        for (Eigen::Index i = 0; i < mu.size(); ++i) {
            if (!(mu[i] > 0.0)) {
                if (counts_[i] > 0.0) {
                    return -std::numeric_limits<double>::infinity();
                }
                continue;
            }
            sum += counts_[i] * std::log(mu[i]) - mu[i];
        }
        return sum;
    }

    double logLikelihood(const Eigen::Vector3d& theta) const {
        return insideBounds(family_, theta) ? logLikelihood(expected(theta))
                                            : -std::numeric_limits<double>::infinity();
    }

    // Cash statistic 2 sum [mu - n + n ln(n / mu)].
    double deviance(const Eigen::VectorXd& mu) const {
        double sum = 0.0;
        for (Eigen::Index i = 0; i < mu.size(); ++i) {
            sum += mu[i] - counts_[i] + (counts_[i] > 0.0 ? counts_[i] * std::log(counts_[i] / mu[i]) : 0.0);
        }
        return 2.0 * sum;
    }

    // d mu / d theta: the density column exactly, the shape columns by central differences.
    Eigen::MatrixXd jacobian(const Eigen::Vector3d& theta, const Eigen::VectorXd& mu) const {
        Eigen::MatrixXd j(mu.size(), static_cast<Eigen::Index>(kParameters));
        j.col(0) = mu / theta[0];
        for (Eigen::Index k = 1; k < static_cast<Eigen::Index>(kParameters); ++k) {
            const double h = 1e-5 * std::max(std::abs(theta[k]), 0.1);
            Eigen::Vector3d up = theta, down = theta;
            up[k] += h;
            down[k] -= h;
            const bool up_ok = insideBounds(family_, up);
            const bool down_ok = insideBounds(family_, down);
            const Eigen::VectorXd mu_up = up_ok ? expected(up) : mu;
            const Eigen::VectorXd mu_down = down_ok ? expected(down) : mu;
            j.col(k) = (mu_up - mu_down) / ((up_ok ? h : 0.0) + (down_ok ? h : 0.0));
        }
        return j;
    }

    // Numerical Hessian of ln L (central second differences).
    Eigen::Matrix3d hessian(const Eigen::Vector3d& theta) const {
        Eigen::Vector3d h;
        for (Eigen::Index k = 0; k < 3; ++k) {
            h[k] = 1e-3 * std::max(std::abs(theta[k]), k == 0 ? 1e-6 : 0.05);
        }
        const auto at = [&](Eigen::Index a, double sa, Eigen::Index b, double sb) {
            Eigen::Vector3d point = theta;
            point[a] += sa * h[a];
            point[b] += sb * h[b];
            return logLikelihood(point);
        };
        const double centre = logLikelihood(theta);
        Eigen::Matrix3d result;
        for (Eigen::Index a = 0; a < 3; ++a) {
            result(a, a) = (at(a, 1, a, 0) - 2.0 * centre + at(a, -1, a, 0)) / (h[a] * h[a]);
            for (Eigen::Index b = a + 1; b < 3; ++b) {
                result(a, b) = result(b, a) =
                    (at(a, 1, b, 1) - at(a, 1, b, -1) - at(a, -1, b, 1) + at(a, -1, b, -1)) /
                    (4.0 * h[a] * h[b]);
            }
        }
        return result;
    }

    const Eigen::VectorXd& counts() const { return counts_; }

  private:
    const LuminosityModel& model_;
    Eigen::MatrixXd response_;
    Eigen::VectorXd counts_;
    ImfFamily family_;
    ImfSettings base_;
    double log_factorials_ = 0.0;
};

std::vector<std::string> parameterNames(ImfFamily family) {
    if (family == ImfFamily::Chabrier2003) {
        return {"density_per_pc3", "peak_mass_msun", "sigma_dex"};
    }
    return {"density_per_pc3", "alpha_mid", "alpha_high"};
}

} // namespace

LuminosityModel::LuminosityModel(double mass_min_msun, double mass_max_msun,
                                 const LuminosityModelSettings& settings,
                                 const photometry::ModelPhotometry& photometry)
    : settings_(settings) {
    const int cells = settings.mass_cells;
    const double log_min = std::log10(mass_min_msun);
    const double log_step = (std::log10(mass_max_msun) - log_min) / cells;
    for (int j = 0; j <= cells; ++j) {
        edges_msun_.push_back(std::pow(10.0, log_min + j * log_step));
    }
    edges_msun_.back() = mass_max_msun;
    for (const double edge : edges_msun_) {
        ln_edges_msun_.push_back(std::log(edge));
    }
    const auto add = [&](int cell, double code, float weight) {
        const double abs_g = photometry.dwarf(code).g;
        if (std::isfinite(abs_g)) {
            elements_.push_back({static_cast<std::uint32_t>(cell), static_cast<float>(abs_g),
                                 photometry::categoryOf(photometry::dwarfClassOfCode(code), code), weight});
        }
    };
    for (int j = 0; j < cells; ++j) {
        const double mass = std::pow(10.0, log_min + (j + 0.5) * log_step);
        if (mass < settings.hydrogen_burning_limit_msun) {
            const int ages = settings.brown_dwarf_age_cells;
            for (int a = 0; a < ages; ++a) {
                const double age_gyr = settings.disc_age_gyr * (a + 0.5) / ages;
                const double teff_k =
                    std::clamp(photometry::brownDwarfTeffK(mass, age_gyr), settings.brown_dwarf_teff_min_k,
                               settings.brown_dwarf_teff_max_k);
                add(j, photometry.codeOfTeff(teff_k), 1.0f / static_cast<float>(ages));
            }
            continue;
        }
        const double lifetime_gyr =
            settings.ms_lifetime_sun_gyr * std::pow(mass, settings.ms_lifetime_exponent);
        const double on_main_sequence = std::min(1.0, lifetime_gyr / settings.disc_age_gyr);
        add(j, photometry.codeOfMass(mass), static_cast<float>(on_main_sequence));
    }
}

std::vector<double> LuminosityModel::cellShares(const InitialMassFunction& imf) const {
    // Differences of the cumulative fraction: one integral per edge rather than two per cell (this runs
    // at every fit iteration and every completeness-correction draw). The cells are wide enough (1200
    // over four decades of mass) that the cancellation costs nothing measurable.
    std::vector<double> shares(cells());
    double below = imf.fractionBelowLn(ln_edges_msun_.front());
    for (std::size_t j = 0; j < shares.size(); ++j) {
        const double next = imf.fractionBelowLn(ln_edges_msun_[j + 1]);
        shares[j] = next - below;
        below = next;
    }
    return shares;
}

std::vector<double> LuminosityModel::responseMatrix(std::span<const std::array<double, 2>> bins,
                                                    double radius_pc, const MagnitudeLimits& limits) const {
    std::vector<double> response(bins.size() * cells(), 0.0);
    const double scatter = settings_.intrinsic_scatter_mag;
    for (const Element& element : elements_) {
        const double volume = effectiveVolumePc3(element.abs_g_mag, radius_pc, limits);
        if (!(volume > 0.0)) {
            continue;
        }
        for (std::size_t b = 0; b < bins.size(); ++b) {
            // Beyond 8 sigma the Gaussian tail is below 1e-15.
            if (element.abs_g_mag < bins[b][0] - 8.0 * scatter ||
                element.abs_g_mag > bins[b][1] + 8.0 * scatter) {
                continue;
            }
            response[b * cells() + element.cell] +=
                element.weight * volume * binProbability(bins[b][0], bins[b][1], element.abs_g_mag, scatter);
        }
    }
    return response;
}

void validateMassFunctionFitSettings(const MassFunctionFitSettings& settings) {
    requireInRange("lf-fit-min", settings.fit_abs_g_min_mag, -5.0, 25.0, "mag");
    requireInRange("lf-fit-max", settings.fit_abs_g_max_mag, -5.0, 25.0, "mag");
    requireThat(settings.fit_abs_g_min_mag < settings.fit_abs_g_max_mag, "lf-fit-min",
                "must be below --lf-fit-max");
    validateImfSettings(settings.start);
}

// The box inside which the IMF is well defined (validateImfSettings accepts all of it).
bool parametersValid(ImfFamily family, std::span<const double> v) {
    if (v.size() != kParameters || !(v[0] > 0.0)) {
        return false;
    }
    if (family == ImfFamily::Chabrier2003) {
        return v[1] > 1e-3 && v[1] < 2.0 && v[2] > 0.05 && v[2] < 3.0;
    }
    return v[1] > -3.0 && v[1] < 5.0 && v[2] > -3.0 && v[2] < 5.0;
}

std::string fitModelName(ImfFamily family) {
    return family == ImfFamily::Chabrier2003 ? "chabrier2003" : "kroupa2001";
}

ImfSettings imfWithParameters(ImfFamily family, const ImfSettings& base, std::span<const double> values) {
    ImfSettings imf = base;
    imf.family = family;
    if (family == ImfFamily::Chabrier2003) {
        imf.chabrier_peak_mass_msun = values[1];
        imf.chabrier_sigma_dex = values[2];
    } else {
        imf.kroupa_alpha_mid = values[1];
        imf.kroupa_alpha_high = values[2];
    }
    return imf;
}

MassFunctionFitResult fitMassFunction(std::span<const LfBin> table, const LuminosityModel& model,
                                      double radius_pc, const MagnitudeLimits& limits,
                                      const MassFunctionFitSettings& settings) {
    MassFunctionFitResult result;
    result.family = settings.family;
    result.names = parameterNames(settings.family);
    result.imf = settings.start;
    result.imf.family = settings.family;
    result.fit_abs_g_mag = {kNaN, kNaN};
    std::vector<std::array<double, 2>> bins;
    std::vector<double> counts;
    for (const LfBin& bin : table) {
        if (bin.population == LfPopulation::MainSequence && bin.complete &&
            bin.abs_g_lo_mag >= settings.fit_abs_g_min_mag - 1e-9 &&
            bin.abs_g_hi_mag <= settings.fit_abs_g_max_mag + 1e-9) {
            bins.push_back({bin.abs_g_lo_mag, bin.abs_g_hi_mag});
            counts.push_back(bin.n_weighted);
        }
    }
    result.bins_used = static_cast<int>(bins.size());
    result.degrees_of_freedom = result.bins_used - static_cast<int>(kParameters);
    if (bins.size() <= kParameters) {
        result.message = "too few complete main-sequence bins in the fit range (" +
                         std::to_string(bins.size()) + ", need at least " + std::to_string(kParameters + 1) +
                         ")";
        return result;
    }
    result.fit_abs_g_mag = {bins.front()[0], bins.back()[1]};
    const double total = std::accumulate(counts.begin(), counts.end(), 0.0);
    if (!(total > 0.0)) {
        result.message = "no main-sequence stars in the fit range";
        return result;
    }
    const std::vector<double> response = model.responseMatrix(bins, radius_pc, limits);
    const auto cells = static_cast<Eigen::Index>(model.cells());
    const BinnedLikelihood likelihood(
        model,
        Eigen::Map<const Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>>(
            response.data(), static_cast<Eigen::Index>(bins.size()), cells),
        Eigen::Map<const Eigen::VectorXd>(counts.data(), static_cast<Eigen::Index>(counts.size())),
        settings.family, settings.start);

    Eigen::Vector3d theta;
    {
        const std::vector<double> start = {
            1.0,
            settings.family == ImfFamily::Chabrier2003 ? settings.start.chabrier_peak_mass_msun
                                                       : settings.start.kroupa_alpha_mid,
            settings.family == ImfFamily::Chabrier2003 ? settings.start.chabrier_sigma_dex
                                                       : settings.start.kroupa_alpha_high};
        theta = Eigen::Vector3d(start[0], start[1], start[2]);
        // Start at the density that matches the total count.
        theta[0] = total / likelihood.expected(theta).sum();
    }
    Eigen::VectorXd mu = likelihood.expected(theta);
    double log_l = likelihood.logLikelihood(mu);
    double damping = 1e-3;
    bool converged = false;
    int iteration = 0;
    for (; iteration < settings.max_iterations && !converged; ++iteration) {
        const Eigen::MatrixXd j = likelihood.jacobian(theta, mu);
        const Eigen::VectorXd residual =
            likelihood.counts().cwiseQuotient(mu) - Eigen::VectorXd::Ones(mu.size());
        const Eigen::Vector3d gradient = j.transpose() * residual;
        const Eigen::Matrix3d fisher = j.transpose() * mu.cwiseInverse().asDiagonal() * j;
        bool stepped = false;
        while (!stepped && damping < 1e12) {
            Eigen::Matrix3d damped = fisher;
            damped.diagonal() *= 1.0 + damping;
            const Eigen::Vector3d step = damped.ldlt().solve(gradient);
            const Eigen::Vector3d trial = theta + step;
            if (insideBounds(settings.family, trial)) {
                const Eigen::VectorXd trial_mu = likelihood.expected(trial);
                const double trial_log_l = likelihood.logLikelihood(trial_mu);
                if (trial_log_l >= log_l) {
                    converged = trial_log_l - log_l < settings.tolerance;
                    theta = trial;
                    mu = trial_mu;
                    log_l = trial_log_l;
                    damping = std::max(damping / 10.0, 1e-9);
                    stepped = true;
                    continue;
                }
            }
            damping *= 10.0;
        }
        if (!stepped) {
            // No uphill step at any damping: a maximum if the Fisher-scaled gradient vanishes.
            converged = gradient.dot(fisher.ldlt().solve(gradient)) < 1e3 * settings.tolerance;
            if (!converged) {
                result.message = "no step increases the likelihood (stalled at a parameter bound?)";
            }
            break;
        }
    }
    result.iterations = iteration;
    result.values.assign(theta.data(), theta.data() + kParameters);
    result.imf = imfWithParameters(settings.family, settings.start, result.values);
    result.log_likelihood = log_l;
    result.deviance = likelihood.deviance(mu);
    result.p_value = result.degrees_of_freedom > 0
                         ? boost::math::gamma_q(0.5 * result.degrees_of_freedom, 0.5 * result.deviance)
                         : kNaN;
    result.errors.assign(kParameters, kNaN);
    if (!converged) {
        if (result.message.empty()) {
            result.message = "not converged after " + std::to_string(iteration) + " iterations";
        }
        return result;
    }
    const Eigen::Matrix3d information = -likelihood.hessian(theta);
    const Eigen::LLT<Eigen::Matrix3d> cholesky(information);
    if (cholesky.info() != Eigen::Success) {
        result.message =
            "the Hessian of ln L is not negative definite at the maximum (parameters unconstrained)";
        return result;
    }
    const Eigen::Matrix3d covariance = cholesky.solve(Eigen::Matrix3d::Identity());
    for (std::size_t a = 0; a < kParameters; ++a) {
        const auto ia = static_cast<Eigen::Index>(a);
        result.errors[a] = std::sqrt(covariance(ia, ia));
        result.covariance.emplace_back();
        for (std::size_t b = 0; b < kParameters; ++b) {
            result.covariance.back().push_back(covariance(ia, static_cast<Eigen::Index>(b)));
        }
    }
    result.converged = true;
    result.message = "converged";
    return result;
}

std::vector<double> modelPhi(const MassFunctionFitResult& fit, const LuminosityModel& model,
                             std::span<const std::array<double, 2>> bins) {
    std::vector<double> phi(bins.size(), kNaN);
    if (!fit.converged) {
        return phi;
    }
    // Without survey limits V_eff = V(R) for every M_G: K / V(R) is the bin's share per unit density.
    constexpr double kRadiusPc = 10.0;
    const MagnitudeLimits unlimited{std::numeric_limits<double>::infinity(),
                                    -std::numeric_limits<double>::infinity()};
    const std::vector<double> response = model.responseMatrix(bins, kRadiusPc, unlimited);
    const std::vector<double> shares = model.cellShares(InitialMassFunction(fit.imf));
    for (std::size_t b = 0; b < bins.size(); ++b) {
        double sum = 0.0;
        for (std::size_t j = 0; j < shares.size(); ++j) {
            sum += response[b * shares.size() + j] * shares[j];
        }
        phi[b] = fit.values[0] * sum / (sphereVolumePc3(kRadiusPc) * (bins[b][1] - bins[b][0]));
    }
    return phi;
}

} // namespace starcensus::census
