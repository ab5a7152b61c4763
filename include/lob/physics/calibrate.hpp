#pragma once
/// \file lob/physics/calibrate.hpp
/// Calibration: fit a drag model's parameter (and optionally each flight's launch speed and
/// elevation) to measured times and positions of one or several flights, by nonlinear
/// least squares (Levenberg–Marquardt, Eigen's unsupported LevenbergMarquardt module),
/// with the standard errors of the estimates, the residuals, and an optional robust loss.
///
/// Heap use: Eigen's Levenberg–Marquardt works on dynamic-size matrices, and the result
/// holds the residuals in a `std::vector`. That is accepted here because calibration is an
/// offline fitting tool, not part of the flight core; `fly()` and every trajectory query
/// stay allocation-free. No exceptions are thrown (Eigen reports through status codes).
///
/// Scalars: models and flights are evaluated in T; for multiprecision T the solver's own
/// algebra runs in long double (see detail::lm_scalar), which bounds the fit's precision
/// at about 1e-19 relative, far below any measurement noise.

#include <Eigen/Dense>
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <span>
#include <type_traits>
#include <unsupported/Eigen/LevenbergMarquardt>
#include <utility>
#include <vector>

#include "lob/core/checks.hpp"
#include "lob/core/flight_types.hpp"
#include "lob/core/options.hpp"
#include "lob/core/result.hpp"
#include "lob/detail/math.hpp"
#include "lob/flight.hpp"

namespace lob {

/// One measurement: time since launch [s] and measured position [m].
template <Real T>
struct sample {
  T time{};
  vec3<T> position = vec3<T>::Zero();
};

/// One measured flight: the nominal launch (position, and velocity whose speed and
/// elevation may be refitted; its azimuth is kept) and the samples taken of it.
template <Real T>
struct measured_flight {
  shot<T> launch{};
  std::span<const sample<T>> samples{};
};

/// How residuals are weighed. `squared` is ordinary least squares. `huber` and `cauchy`
/// limit the pull of outliers: each residual component r [m] enters as rho(r) with scale
/// `fit_options::loss_scale` delta, rho = r^2/2 for |r| <= delta and delta (|r| - delta/2)
/// beyond (Huber 1964), or rho = (delta^2/2) log(1 + (r/delta)^2) (Cauchy/Lorentz).
enum class fit_loss { squared, huber, cauchy };

/// Settings of `calibrate`.
template <Real T>
struct fit_options {
  bool fit_speed = false;      ///< also fit each flight's launch speed
  bool fit_elevation = false;  ///< also fit each flight's launch elevation above the horizon
  fit_loss loss = fit_loss::squared;
  T loss_scale = T(1) / T(100);      ///< delta [m] of the robust losses; about 2-3 noise sigmas
  std::int64_t max_evaluations = 4000;  ///< Levenberg–Marquardt's budget of residual evaluations
  /// Total integration steps of all the flights of one call (every step of every query of
  /// every evaluation; a hodograph-path query counts as in `solve_options::max_total_steps`).
  /// When it runs out the call returns `step_limit`. The default keeps a call below about
  /// 1 s on the 2-core development machine (0.1-0.5 us per step); closed-form models take
  /// no steps. Where `flight.shared_steps` is set, that pool is drawn from instead.
  std::int64_t max_total_steps = 2000000;
  flight_options<T> flight{};         ///< how integrated models are flown
};

/// What `calibrate` found. Standard errors come from the covariance s^2 (J^T J)^-1 at the
/// solution, s^2 = (sum of squared residuals) / (m - n) for m residual components and n
/// unknowns: right to first order for small, independent, equal-variance noise. With a
/// robust loss, J is that of the transformed residuals (outliers weigh less) and s is the
/// robust scale 1.4826 * median |r| (times sqrt(m / (m - n))): an approximation.
template <Real T>
struct fit_result {
  T parameter{};        ///< the drag parameter (rate, coefficient, ...) as `make` takes it
  T parameter_error{};  ///< its standard error
  std::vector<T> speeds, speed_errors;          ///< per flight [m/s], when fitted
  std::vector<T> elevations, elevation_errors;  ///< per flight [rad], when fitted
  std::vector<vec3<T>> residuals;               ///< measured minus predicted, sample order [m]
  T rms{};                 ///< root mean square of the residual components [m]
  T noise_sigma{};         ///< s, the estimated noise per component [m]
  std::int64_t evaluations = 0;  ///< residual evaluations used
  std::int64_t iterations = 0;   ///< Levenberg–Marquardt iterations
  std::int64_t steps = 0;        ///< integration steps drawn (see `fit_options::max_total_steps`)
};

namespace detail {

// The robust transform r -> r' with r'^2 = 2 rho(r), sign kept: least squares on r' then
// minimises sum rho(r) (the square-root form of an M-estimator).
template <Real T>
[[nodiscard]] T robust_residual(const T& r, fit_loss loss, const T& delta) {
  using std::abs;
  using std::log;
  using std::sqrt;
  const T sign = r < T(0) ? T(-1) : T(1);
  switch (loss) {
    case fit_loss::squared: return r;
    case fit_loss::huber:
      if (abs(r) <= delta) return r;
      return T(sign * sqrt(T(T(2) * delta * abs(r) - delta * delta)));
    case fit_loss::cauchy: {
      const T u = r / delta;
      return T(sign * delta * sqrt(T(detail::log1p(T(u * u)))));
    }
  }
  return r;
}

// The scalar of the least-squares algebra: T itself for built-in types; long double for
// multiprecision types, whose Eigen adaptor (Boost 1.74) lacks the NumTraits members
// (digits, min_exponent) that Eigen's Levenberg–Marquardt needs. Models and flights are
// still evaluated in T; only the solver's steps and the covariance are in long double,
// far finer than any measurement noise.
template <class T>
using lm_scalar = std::conditional_t<std::is_floating_point_v<T>, T, long double>;

template <Real T, class MakeModel>
class calibration_problem : public Eigen::DenseFunctor<lm_scalar<T>> {
 public:
  using S = lm_scalar<T>;
  using base = Eigen::DenseFunctor<S>;
  using typename base::InputType;
  using typename base::JacobianType;
  using typename base::ValueType;

  calibration_problem(const MakeModel& make, std::span<const measured_flight<T>> flights,
                      const medium<T>& air, const fit_options<T>& options, int unknowns, int values)
      : base(unknowns, values), make_(make), flights_(flights), air_(air), options_(options) {}

  // Raw residuals (measured - predicted) for the unknowns x; false (with failure_ set) if a
  // flight could not be flown.
  bool raw(const InputType& x, std::vector<vec3<T>>& out) const {
    using std::cos;
    using std::exp;
    using std::sin;
    using std::sqrt;
    out.clear();
    const T p = exp(T(x(0)));
    const auto model = make_(p);
    const vec3<T> u = up(air_);
    int k = 1;
    for (const measured_flight<T>& f : flights_) {
      shot<T> launch = f.launch;
      if (options_.fit_speed || options_.fit_elevation) {
        const vec3<T> v0 = f.launch.velocity;
        const vec3<T> level = horizontal(v0, air_);
        const T level_speed = sqrt(T(level.squaredNorm()));
        const T speed0 = sqrt(T(v0.squaredNorm()));
        T speed = speed0;
        T elevation = T(0);
        using std::atan2;
        elevation = atan2(T(u.dot(v0)), level_speed);
        if (options_.fit_speed) speed = T(x(k++));
        if (options_.fit_elevation) elevation = T(x(k++));
        const vec3<T> dir = level_speed > T(0) ? vec3<T>(level / level_speed) : vec3<T>(vec3<T>::Zero());
        launch.velocity = vec3<T>(speed * (T(cos(elevation)) * dir + T(sin(elevation)) * u));
      }
      const auto flight = fly(model, air_, launch, options_.flight);
      if (!flight) {
        failure_ = flight.error();
        return false;
      }
      for (const sample<T>& s : f.samples) {
        const result<state<T>> at = flight->at(s.time);
        if (!at) {
          failure_ = at.error();
          return false;
        }
        out.push_back(vec3<T>(s.position - at->position));
      }
    }
    return true;
  }

  int operator()(const InputType& x, ValueType& fvec) const {
    ++evaluations_;
    if (!raw(x, scratch_)) return -1;
    for (std::size_t i = 0; i < scratch_.size(); ++i)
      for (int c = 0; c < 3; ++c)
        fvec(static_cast<Eigen::Index>(3 * i) + c) =
            static_cast<S>(robust_residual(T(scratch_[i](c)), options_.loss, options_.loss_scale));
    return 0;
  }

  // Central differences, step cbrt(eps) * max(|x_i|, 1): error O(h^2) ~ eps^(2/3).
  int df(const InputType& x, JacobianType& jac) const {
    using std::abs;
    using std::cbrt;
    const S h0 = cbrt(std::numeric_limits<S>::epsilon());
    InputType xp = x;
    ValueType fp(this->values()), fm(this->values());
    for (Eigen::Index j = 0; j < x.size(); ++j) {
      const S h = h0 * (abs(x(j)) > S(1) ? S(abs(x(j))) : S(1));
      xp(j) = x(j) + h;
      if ((*this)(xp, fp) != 0) return -1;
      xp(j) = x(j) - h;
      if ((*this)(xp, fm) != 0) return -1;
      xp(j) = x(j);
      jac.col(j) = (fp - fm) / S(2 * h);
    }
    return 0;
  }

  const error& failure() const { return failure_; }
  std::int64_t evaluations() const { return evaluations_; }

 private:
  const MakeModel& make_;
  std::span<const measured_flight<T>> flights_;
  medium<T> air_;
  fit_options<T> options_;
  mutable std::vector<vec3<T>> scratch_;
  mutable error failure_{};
  mutable std::int64_t evaluations_ = 0;
};

}  // namespace detail

namespace detail {
// calibrate() with its inputs checked and options.flight.shared_steps set.
template <Real T, class MakeModel>
[[nodiscard]] result<fit_result<T>> calibrate_on_pool(const MakeModel& make, const T& initial,
                                                      std::span<const measured_flight<T>> flights,
                                                      const medium<T>& air, const fit_options<T>& options) {
  using std::exp;
  using std::log;
  using std::sqrt;
  if (options.loss != fit_loss::squared && (!is_finite(options.loss_scale) || !(options.loss_scale > T(0))))
    return fail(errc::invalid_argument, "robust loss scale must be finite and > 0 [m]", options.loss_scale);
  std::size_t count = 0;
  for (const measured_flight<T>& f : flights) {
    if (f.samples.empty()) return fail(errc::too_few_samples, "every flight needs at least one sample");
    if (!is_finite(f.launch.velocity) || !is_finite(f.launch.position))
      return fail(errc::invalid_argument, "launch position and velocity must be finite");
    if (options.fit_elevation && !(T(horizontal(f.launch.velocity, air).squaredNorm()) > T(0)))
      return fail(errc::invalid_argument, "fitting the elevation needs a launch with a horizontal direction");
    for (const sample<T>& s : f.samples) {
      if (const status ok = require_non_negative(s.time, "sample time must be finite and >= 0 [s]"); !ok)
        return unexpected<error>(ok.error());
      if (!is_finite(s.position)) return fail(errc::invalid_argument, "sample position must be finite");
    }
    count += f.samples.size();
  }
  const int per_flight = (options.fit_speed ? 1 : 0) + (options.fit_elevation ? 1 : 0);
  const int unknowns = 1 + per_flight * static_cast<int>(flights.size());
  const int values = static_cast<int>(3 * count);
  if (values <= unknowns)
    return fail(errc::too_few_samples,
                "more residual components (3 per sample) than unknowns needed, samples", count);

  using problem_type = calibration_problem<T, MakeModel>;
  problem_type problem(make, flights, air, options, unknowns, values);
  using S = lm_scalar<T>;
  using matrix = Eigen::Matrix<S, Eigen::Dynamic, Eigen::Dynamic>;
  Eigen::Matrix<S, Eigen::Dynamic, 1> x(unknowns);
  x(0) = static_cast<S>(T(log(initial)));
  {
    int k = 1;
    const vec3<T> u = up(air);
    for (const measured_flight<T>& f : flights) {
      using std::atan2;
      const T level = sqrt(T(horizontal(f.launch.velocity, air).squaredNorm()));
      if (options.fit_speed) x(k++) = static_cast<S>(T(sqrt(T(f.launch.velocity.squaredNorm()))));
      if (options.fit_elevation) x(k++) = static_cast<S>(T(atan2(T(u.dot(f.launch.velocity)), level)));
    }
  }
  Eigen::LevenbergMarquardt<problem_type> lm(problem);
  lm.setMaxfev(static_cast<Eigen::Index>(options.max_evaluations));
  const Eigen::LevenbergMarquardtSpace::Status status = lm.minimize(x);
  namespace lms = Eigen::LevenbergMarquardtSpace;
  if (status == lms::UserAsked) return unexpected<error>(problem.failure());
  if (status == lms::ImproperInputParameters)
    return fail(errc::invalid_argument, "Levenberg-Marquardt rejected the problem's inputs");
  if (status == lms::TooManyFunctionEvaluation || status == lms::Running || status == lms::NotStarted)
    return fail(errc::no_convergence, "fit did not converge within max_evaluations", options.max_evaluations);
  // Statuses 1-4 converged by the tolerances; 6-8 stopped because no further reduction is
  // possible at the precision of T, which is converged too.

  typename problem_type::JacobianType jac(values, unknowns);
  typename problem_type::ValueType fvec(values);
  if (problem(x, fvec) != 0 || problem.df(x, jac) != 0) return unexpected<error>(problem.failure());
  const matrix normal = jac.transpose() * jac;
  const Eigen::LDLT<matrix> ldlt(normal);
  const matrix eye = matrix::Identity(unknowns, unknowns);
  const matrix covariance_unscaled = ldlt.solve(eye);
  std::vector<vec3<T>> raw;
  if (!problem.raw(x, raw)) return unexpected<error>(problem.failure());
  S s2 = fvec.squaredNorm() / S(values - unknowns);
  if (options.loss != fit_loss::squared) {
    // Robust scale: 1.4826 times the median absolute residual component (consistent for
    // Gaussian noise), so that outliers do not inflate the noise estimate.
    std::vector<T> magnitudes;
    magnitudes.reserve(static_cast<std::size_t>(values));
    for (const vec3<T>& r : raw)
      for (int c = 0; c < 3; ++c) {
        using std::abs;
        magnitudes.push_back(abs(T(r(c))));
      }
    const std::size_t mid = magnitudes.size() / 2;
    std::nth_element(magnitudes.begin(), magnitudes.begin() + static_cast<std::ptrdiff_t>(mid),
                     magnitudes.end());
    const T mad = T(14826) / T(10000) * magnitudes[mid];
    s2 = static_cast<S>(T(mad * mad * T(values) / T(values - unknowns)));
  }
  S smallest_pivot = S(0), largest_pivot = S(0);
  for (Eigen::Index i = 0; i < unknowns; ++i) {
    using std::abs;
    const S d = abs(S(ldlt.vectorD()(i)));
    if (i == 0 || d < smallest_pivot) smallest_pivot = d;
    if (d > largest_pivot) largest_pivot = d;
  }
  if (ldlt.info() != Eigen::Success ||
      !(smallest_pivot > S(100) * std::numeric_limits<S>::epsilon() * largest_pivot) ||
      !std::isfinite(covariance_unscaled(0, 0)))
    return fail(errc::no_convergence,
                "the unknowns are not identifiable from these samples (singular J^T J)");

  fit_result<T> out;
  out.parameter = exp(T(x(0)));
  out.parameter_error = out.parameter * sqrt(T(s2 * covariance_unscaled(0, 0)));
  int k = 1;
  for (std::size_t f = 0; f < flights.size(); ++f) {
    if (options.fit_speed) {
      out.speeds.push_back(T(x(k)));
      out.speed_errors.push_back(sqrt(T(s2 * covariance_unscaled(k, k))));
      ++k;
    }
    if (options.fit_elevation) {
      out.elevations.push_back(T(x(k)));
      out.elevation_errors.push_back(sqrt(T(s2 * covariance_unscaled(k, k))));
      ++k;
    }
  }
  T sum = T(0);
  for (const vec3<T>& r : raw) sum += T(r.squaredNorm());
  out.residuals = std::move(raw);
  out.rms = sqrt(T(sum / T(values)));
  out.noise_sigma = sqrt(s2);
  out.evaluations = problem.evaluations();
  out.iterations = static_cast<std::int64_t>(lm.iterations());
  // Samples far enough from every flight of the model (residuals above the square root of
  // the largest T) overflow the sums of squares: an error, never an infinite estimate.
  if (const lob::status ok = first_failure(
          require_representable(out.parameter, "the fitted drag parameter leaves the range of T", true),
          require_representable(out.parameter_error,
                                "the standard error of the drag parameter leaves the range of T"),
          require_representable(out.rms, "the rms residual leaves the range of T (samples too far off?) [m]"),
          require_representable(out.noise_sigma, "the noise estimate leaves the range of T [m]"));
      !ok)
    return unexpected<error>(ok.error());
  for (const auto* list : {&out.speeds, &out.speed_errors, &out.elevations, &out.elevation_errors})
    for (const T& v : *list)
      if (const lob::status ok = require_representable(v, "a fitted launch speed or elevation or its error "
                                                     "leaves the range of T");
          !ok)
        return unexpected<error>(ok.error());
  for (const vec3<T>& r : out.residuals)
    if (!is_finite(r)) return fail(errc::invalid_argument, "a residual leaves the range of T [m]");
  return out;
}

}  // namespace detail

/// Fits the drag parameter p of a model family to measured flights. `make(p)` builds the
/// model for a parameter p > 0 (for instance `[](double k) { return lob::linear_drag<double>{k}; }`
/// or a quadratic_drag coefficient); every flight is flown with `lob::fly(model, air,
/// launch, options.flight)` and compared with its samples through `trajectory.at(t)`.
/// `initial` is a starting guess of p (> 0); p is fitted on a log scale, which keeps it
/// positive, and its standard error is carried back by the delta method (p times the
/// error of log p). With `fit_speed` / `fit_elevation` each flight's launch speed and
/// elevation are unknowns too, started from its nominal launch.
///
/// Errors: `invalid_argument` for a bad guess, sample or option, or a flight that cannot
/// be flown (the model's own error is passed on); `too_few_samples` when there are not
/// more residual components (3 per sample) than unknowns, or a flight without samples;
/// `no_convergence` when Levenberg–Marquardt runs out of evaluations or the unknowns are
/// not identifiable from the data (singular J^T J); `step_limit` when the flights used
/// `max_total_steps`; `invalid_argument` also when an estimate, its standard error or the
/// residuals leave the range of T (samples so far from any flight of the model that their
/// squares overflow).
template <Real T, class MakeModel>
[[nodiscard]] result<fit_result<T>> calibrate(const MakeModel& make, const T& initial,
                                              std::span<const measured_flight<T>> flights,
                                              const medium<T>& air, const fit_options<T>& options = {}) {
  using model_type = std::remove_cvref_t<decltype(make(initial))>;
  static_assert(DragModel<model_type>, "make(p) must return a lob::DragModel");
  if (const status ok = require_positive(initial, "initial drag parameter must be finite and > 0"); !ok)
    return unexpected<error>(ok.error());
  if (flights.empty()) return fail(errc::too_few_samples, "calibration needs at least one flight");
  if (options.max_evaluations < 1)
    return fail(errc::invalid_argument, "max_evaluations must be >= 1", options.max_evaluations);
  if (options.max_total_steps < 1)
    return fail(errc::invalid_argument, "max_total_steps must be >= 1", options.max_total_steps);
  // One pool for every flight of every evaluation (the caller's, where given), so that the
  // whole call is bounded, not only each query.
  step_pool own{options.max_total_steps};
  fit_options<T> budgeted = options;
  if (!budgeted.flight.shared_steps) budgeted.flight.shared_steps = &own;
  step_pool& pool = *budgeted.flight.shared_steps;
  const std::int64_t before = pool.left;
  result<fit_result<T>> r = detail::calibrate_on_pool(make, initial, flights, air, std::as_const(budgeted));
  if (pool.exhausted)
    return fail(errc::step_limit, "calibration used its whole step budget (fit_options::max_total_steps)",
                options.max_total_steps);
  if (r) r->steps = before - pool.left;
  return r;
}

/// As above for a single flight.
template <Real T, class MakeModel>
[[nodiscard]] result<fit_result<T>> calibrate(const MakeModel& make, const T& initial,
                                              const measured_flight<T>& flight, const medium<T>& air,
                                              const fit_options<T>& options = {}) {
  return calibrate(make, initial, std::span<const measured_flight<T>>(&flight, 1), air, options);
}

}  // namespace lob
