#include "study/work_codec.hpp"

#include <cstring>
#include <map>
#include <stdexcept>
#include <type_traits>

namespace tocsin {

namespace {

// Every struct's fields are listed once, in `fields`, for both directions.
// A field added to one of these structs and not listed here would silently
// not travel: the sizes below stop the build instead (amd64).
static_assert(sizeof(PlanFigures) == 528, "PlanFigures changed: list the new field in fields(PlanFigures) below");
static_assert(sizeof(UnitFigures) == 312, "UnitFigures changed: list the new field in fields(UnitFigures) below");
static_assert(sizeof(LoggedNotice) == 176, "LoggedNotice changed: list the new field in fields(LoggedNotice) below");
static_assert(sizeof(Population) == 384, "Population changed: list the new field in fields(Population) below");
static_assert(sizeof(Encounter) == 96, "Encounter changed: list the new field in fields(Encounter) below");
static_assert(sizeof(OtherScore) == 128, "OtherScore changed: list the new field in fields(OtherScore) below");
static_assert(sizeof(Score) == 24, "Score changed: list the new field in fields(Score) below");
static_assert(sizeof(Exclusions) == 192, "Exclusions changed: list the new field in fields(Exclusions) below");
static_assert(sizeof(SkippedRows) == 32, "SkippedRows changed: list the new field in fields(SkippedRows) below");
static_assert(sizeof(LoggedTask) == 288, "LoggedTask changed: list the new field in fields(LoggedTask) below");
static_assert(sizeof(GroupFigures) == 224, "GroupFigures changed: list the new field in fields(GroupFigures) below");
static_assert(sizeof(GroupColumn) == 80, "GroupColumn changed: list the new field in fields(GroupColumn) below");
static_assert(sizeof(Interval) == 16, "Interval changed: list the new field in fields(Interval) below");

class Writer {
public:
    template <typename T>
        requires std::is_arithmetic_v<T> || std::is_enum_v<T>
    void operator()(const T& v) {
        char raw[sizeof(T)];
        std::memcpy(raw, &v, sizeof(T));
        bytes.append(raw, sizeof(T));
    }
    void operator()(const std::string& s) {
        (*this)(static_cast<std::uint64_t>(s.size()));
        bytes += s;
    }
    template <typename T>
    void operator()(const std::optional<T>& v) {
        (*this)(static_cast<std::uint8_t>(v.has_value()));
        if (v) (*this)(*v);
    }
    template <typename T>
    void operator()(const std::vector<T>& v) {
        (*this)(static_cast<std::uint64_t>(v.size()));
        for (const T& e : v) (*this)(e);
    }
    template <typename K, typename T>
    void operator()(const std::map<K, T>& m) {
        (*this)(static_cast<std::uint64_t>(m.size()));
        for (const auto& [k, v] : m) (*this)(k), (*this)(v);
    }
    template <typename T>
        requires std::is_class_v<T>
    void operator()(const T& v) {
        fields(*this, const_cast<T&>(v));  // fields() only reads through a Writer
    }
    std::string bytes;
};

class Reader {
public:
    explicit Reader(const std::string& bytes) : bytes_(bytes) {}
    template <typename T>
        requires std::is_arithmetic_v<T> || std::is_enum_v<T>
    void operator()(T& v) {
        std::memcpy(&v, take(sizeof(T)), sizeof(T));
    }
    void operator()(std::string& s) {
        const std::size_t n = count(1);
        s.assign(take(n), n);
    }
    template <typename T>
    void operator()(std::optional<T>& v) {
        std::uint8_t present = 0;
        (*this)(present);
        if (present > 1) throw std::runtime_error("work result bytes are damaged (an optional flag of " + std::to_string(present) + ")");
        v.reset();
        if (present) (*this)(v.emplace());
    }
    template <typename T>
    void operator()(std::vector<T>& v) {
        v.assign(count(1), T{});  // every element takes a byte at least
        for (T& e : v) (*this)(e);
    }
    template <typename K, typename T>
    void operator()(std::map<K, T>& m) {
        m.clear();
        for (std::size_t n = count(1); n > 0; --n) {
            K k{};
            T v{};
            (*this)(k), (*this)(v);
            m.emplace(std::move(k), std::move(v));
        }
    }
    template <typename T>
        requires std::is_class_v<T>
    void operator()(T& v) {
        fields(*this, v);
    }
    void expect_end() const {
        if (at_ != bytes_.size()) throw std::runtime_error("work result bytes run on past their end");
    }

private:
    // A length, checked against what is left so that damaged bytes cannot ask for gigabytes.
    std::size_t count(std::size_t min_bytes_each) {
        std::uint64_t n = 0;
        (*this)(n);
        if (n > (bytes_.size() - at_) / min_bytes_each) throw std::runtime_error("work result bytes end early");
        return static_cast<std::size_t>(n);
    }
    const char* take(std::size_t n) {
        if (n > bytes_.size() - at_) throw std::runtime_error("work result bytes end early");
        const char* p = bytes_.data() + at_;
        at_ += n;
        return p;
    }
    const std::string& bytes_;
    std::size_t at_ = 0;
};

template <typename V>
void fields(V& v, WorkItem& i) {
    v(i.replication), v(i.first_plan), v(i.plan_count);
}

template <typename V>
void fields(V& v, PlanFigures& f) {
    v(f.notices), v(f.notices_first), v(f.notices_repeat), v(f.notices_rise);
    v(f.per_unit_shift_mean), v(f.per_unit_shift_p90), v(f.per_unit_shift_max);
    v(f.per_unit_night_mean), v(f.per_unit_night_p90), v(f.per_unit_night_max);
    v(f.worst_unit_night_mean), v(f.worst_unit_night_p90);
    v(f.patients_per_unit_night_mean), v(f.patients_per_unit_night_p90), v(f.patients_per_unit_night_max);
    v(f.notice_ppv), v(f.patient_ppv);
    v(f.cases), v(f.caught), v(f.missed), v(f.evaluated_non_cases);
    v(f.sensitivity), v(f.lead_median_hours), v(f.lead_q1_hours), v(f.lead_q3_hours), v(f.notices_per_catch);
    v(f.evaluations), v(f.caught_by_notice), v(f.lead_from_notice_median_hours);
    v(f.wait_median_minutes), v(f.wait_p90_minutes), v(f.never_taken_up);
    v(f.channel_burden_mean), v(f.channel_burden_p90), v(f.staff_minutes_per_unit_shift), v(f.evaluations_per_unit_shift);
    v(f.unit_shift_counts);
    v(f.assumed_averted), v(f.evaluations_per_assumed_averted);
}

template <typename V>
void fields(V& v, UnitFigures& f) {
    v(f.plan), v(f.unit), v(f.notices);
    v(f.shift_mean), v(f.shift_p90), v(f.shift_max), v(f.night_mean), v(f.night_p90), v(f.night_max);
    v(f.patients_per_night_mean), v(f.patients_per_night_p90), v(f.patients_per_night_max);
    v(f.notice_ppv), v(f.cases), v(f.caught), v(f.sensitivity), v(f.lead_median_hours);
    v(f.team_minutes_per_shift_mean), v(f.team_minutes_per_shift_p90);
}

template <typename V>
void fields(V& v, Interval& i) {
    v(i.lower), v(i.upper);
}

template <typename V>
void fields(V& v, GroupFigures& f) {
    v(f.plan), v(f.group), v(f.value), v(f.encounters), v(f.patient_days), v(f.suppressed), v(f.notices);
    v(f.notices_per_100_patient_days), v(f.notice_ppv), v(f.cases), v(f.caught), v(f.sensitivity);
    v(f.sensitivity_interval), v(f.lead_median_hours);
}

template <typename V>
void fields(V& v, GroupColumn& c) {
    v(c.name), v(c.values), v(c.recorded_as_missing);
}

template <typename V>
void fields(V& v, LoggedNotice& n) {
    v(n.plan), v(n.replication), v(n.encounter), v(n.unit), v(n.at), v(n.score), v(n.reason), v(n.channel);
    v(n.asks_evaluation), v(n.opener), v(n.delivery_minutes);
}

template <typename V>
void fields(V& v, LoggedTask& t) {
    v(t.plan), v(t.replication), v(t.task), v(t.encounter), v(t.unit), v(t.score), v(t.created), v(t.started), v(t.ended);
    v(t.first_role), v(t.role), v(t.wait_minutes), v(t.work_minutes), v(t.escalations), v(t.handed_over);
    v(t.overtime_minutes), v(t.fate);
}

template <typename V>
void fields(V& v, Encounter& e) {
    v(e.id), v(e.unit), v(e.admitted), v(e.discharged), v(e.outcome_at), v(e.groups);
}

template <typename V>
void fields(V& v, Score& s) {
    v(s.available_at), v(s.scored_at), v(s.value);
}

template <typename V>
void fields(V& v, SkippedRows& r) {
    v(r.count), v(r.first_lines);
}

template <typename V>
void fields(V& v, Exclusions& x) {
    v(x.scores_by_reason), v(x.encounters_by_reason), v(x.notes), v(x.rows_skipped);
}

template <typename V>
void fields(V& v, OtherScore& o) {
    v(o.name), v(o.scores), v(o.score_start), v(o.excluded_by_reason);
}

template <typename V>
void fields(V& v, Population& p) {
    v(p.units), v(p.groups), v(p.encounters), v(p.scores), v(p.score_start), v(p.excluded), v(p.period_start), v(p.period_end);
    v(p.score_name), v(p.other_scores);
}

template <typename V>
void fields(V& v, WorkResult& r) {
    v(r.item), v(r.figures), v(r.unit_figures), v(r.group_figures), v(r.notice_log), v(r.task_log);
}

template <typename T>
std::string encode(const T& value) {
    Writer w;
    w(value);
    return std::move(w.bytes);
}

template <typename T>
T decode(const std::string& bytes) {
    Reader r(bytes);
    T value{};
    r(value);
    r.expect_end();
    return value;
}

}  // namespace

std::string encode_work_item(const WorkItem& item) { return encode(item); }
WorkItem decode_work_item(const std::string& bytes) { return decode<WorkItem>(bytes); }
std::string encode_work_result(const WorkResult& result) { return encode(result); }
WorkResult decode_work_result(const std::string& bytes) { return decode<WorkResult>(bytes); }
std::string encode_population(const Population& population) { return encode(population); }
Population decode_population(const std::string& bytes) { return decode<Population>(bytes); }

}  // namespace tocsin
