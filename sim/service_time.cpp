#include "sim/service_time.hpp"

#include <boost/random/exponential_distribution.hpp>
#include <boost/random/lognormal_distribution.hpp>
#include <boost/random/normal_distribution.hpp>
#include <boost/random/uniform_01.hpp>
#include <boost/random/uniform_int_distribution.hpp>
#include <cmath>
#include <cstdio>
#include <stdexcept>


namespace tocsin {
namespace {

template <class... F>
struct Overloaded : F... {
    using F::operator()...;
};
template <class... F>
Overloaded(F...) -> Overloaded<F...>;

std::string real(double v) {
    char buf[48];
    std::snprintf(buf, sizeof buf, "%.6g", v);
    return buf;
}

bool positive(double v) { return std::isfinite(v) && v > 0.0; }

}  // namespace

std::string service_time_problem(const ServiceTime& d) {
    return std::visit(
        Overloaded{
            [](const FixedMinutes& f) -> std::string {
                return positive(f.minutes) ? "" : "fixed: minutes must be > 0 (got " + real(f.minutes) + ")";
            },
            [](const ExponentialMinutes& e) -> std::string {
                return positive(e.mean_minutes)
                           ? ""
                           : "exponential: mean_minutes must be > 0 (got " + real(e.mean_minutes) + ")";
            },
            [](const GammaMinutes& g) -> std::string {
                if (!positive(g.mean_minutes))
                    return "gamma: mean_minutes must be > 0 (got " + real(g.mean_minutes) + ")";
                if (!positive(g.sd_minutes))
                    return "gamma: sd_minutes must be > 0 (got " + real(g.sd_minutes) +
                           "); for a constant time use the fixed distribution";
                return "";
            },
            [](const LognormalMinutes& l) -> std::string {
                if (!positive(l.median_minutes))
                    return "lognormal: median_minutes must be > 0 (got " + real(l.median_minutes) + ")";
                if (!std::isfinite(l.spread_factor) || l.spread_factor < 1.0)
                    return "lognormal: spread_factor is a ratio (84th percentile / median) and must be >= 1 (got " +
                           real(l.spread_factor) + ")";
                return "";
            },
            [](const EmpiricalMinutes& e) -> std::string {
                if (e.minutes.empty()) return "empirical: the list of minutes is empty; give at least one value";
                for (std::size_t i = 0; i < e.minutes.size(); ++i)
                    if (!std::isfinite(e.minutes[i]) || e.minutes[i] < 0.0)
                        return "empirical: value " + std::to_string(i + 1) + " must be >= 0 minutes (got " +
                               real(e.minutes[i]) + ")";
                return "";
            },
        },
        d);
}

void check_service_time(const ServiceTime& d) {
    if (std::string p = service_time_problem(d); !p.empty()) throw std::invalid_argument(p);
}

namespace {

// Gamma(shape, scale) by Marsaglia & Tsang (2000, ACM TOMS 26:363-372), built
// on Boost.Random's normal (ziggurat) and uniform draws. Boost's own gamma
// uses a tangent-based rejection that costs several times more per draw, and
// task minutes are drawn once per task on the hot path. Shape < 1 uses the
// authors' boost: Gamma(a) = Gamma(a + 1) * U^(1/a).
template <class Engine>
double marsaglia_tsang_gamma(double shape, double scale, Engine& stream) {
    boost::random::normal_distribution<double> normal;
    boost::random::uniform_01<double> uniform;
    double boost_factor = 1.0;
    if (shape < 1.0) {
        boost_factor = std::pow(uniform(stream), 1.0 / shape);
        shape += 1.0;
    }
    const double d = shape - 1.0 / 3.0, c = 1.0 / std::sqrt(9.0 * d);
    for (;;) {
        const double x = normal(stream);
        double v = 1.0 + c * x;
        if (v <= 0.0) continue;
        v = v * v * v;
        const double u = uniform(stream);
        const double x2 = x * x;
        if (u < 1.0 - 0.0331 * x2 * x2 || std::log(u) < 0.5 * x2 + d * (1.0 - v + std::log(v)))
            return d * v * scale * boost_factor;
    }
}

template <class Engine>
double draw_with(const ServiceTime& d, Engine& stream) {
    return std::visit(
        Overloaded{
            [](const FixedMinutes& f) { return f.minutes; },
            [&](const ExponentialMinutes& e) {
                return boost::random::exponential_distribution<double>(1.0 / e.mean_minutes)(stream);
            },
            [&](const GammaMinutes& g) {
                const double shape = (g.mean_minutes / g.sd_minutes) * (g.mean_minutes / g.sd_minutes);
                const double scale = g.sd_minutes * g.sd_minutes / g.mean_minutes;
                return marsaglia_tsang_gamma(shape, scale, stream);
            },
            [&](const LognormalMinutes& l) {
                // Boost's (m, s) are the mean and sd of log(minutes).
                return boost::random::lognormal_distribution<double>(std::log(l.median_minutes),
                                                                     std::log(l.spread_factor))(stream);
            },
            [&](const EmpiricalMinutes& e) {
                boost::random::uniform_int_distribution<std::size_t> pick(0, e.minutes.size() - 1);
                return e.minutes[pick(stream)];
            },
        },
        d);
}
}  // namespace

double draw_minutes(const ServiceTime& d, RandomEngine& stream) { return draw_with(d, stream); }
double draw_minutes(const ServiceTime& d, SplitMixEngine& stream) { return draw_with(d, stream); }

Seconds draw_seconds(const ServiceTime& d, RandomEngine& stream) {
    return static_cast<Seconds>(std::llround(draw_with(d, stream) * 60.0));
}
Seconds draw_seconds(const ServiceTime& d, SplitMixEngine& stream) {
    return static_cast<Seconds>(std::llround(draw_with(d, stream) * 60.0));
}

double mean_minutes(const ServiceTime& d) {
    return std::visit(Overloaded{
                          [](const FixedMinutes& f) { return f.minutes; },
                          [](const ExponentialMinutes& e) { return e.mean_minutes; },
                          [](const GammaMinutes& g) { return g.mean_minutes; },
                          [](const LognormalMinutes& l) {
                              const double s = std::log(l.spread_factor);
                              return l.median_minutes * std::exp(s * s / 2.0);
                          },
                          [](const EmpiricalMinutes& e) {
                              double sum = 0;
                              for (double m : e.minutes) sum += m;
                              return e.minutes.empty() ? 0.0 : sum / static_cast<double>(e.minutes.size());
                          },
                      },
                      d);
}

std::string describe(const ServiceTime& d) {
    return std::visit(
        Overloaded{
            [](const FixedMinutes& f) { return "fixed " + real(f.minutes) + " min"; },
            [](const ExponentialMinutes& e) { return "exponential (mean " + real(e.mean_minutes) + " min)"; },
            [](const GammaMinutes& g) {
                return "gamma (mean " + real(g.mean_minutes) + " min, sd " + real(g.sd_minutes) + " min)";
            },
            [](const LognormalMinutes& l) {
                return "lognormal (median " + real(l.median_minutes) + " min, spread x" + real(l.spread_factor) +
                       ")";
            },
            [](const EmpiricalMinutes& e) {
                return "empirical (" + std::to_string(e.minutes.size()) + " values, mean " +
                       real(mean_minutes(ServiceTime{e})) + " min)";
            },
        },
        d);
}

}  // namespace tocsin
