#include "sim/staff.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <stdexcept>

#include "sim/event_queue.hpp"

namespace tocsin {

int headcount(const Roster& roster, const Shift& shift) {
    const auto& row = roster.by_weekday.empty() ? roster.by_shift : roster.by_weekday[shift.weekday];
    return row[shift.pattern_index];
}

std::string_view to_string(TaskFate fate) {
    switch (fate) {
        case TaskFate::finished: return "finished";
        case TaskFate::escalated_then_finished: return "escalated_then_finished";
        case TaskFate::in_progress_at_end: return "in_progress_at_end";
        case TaskFate::never_taken_up: return "never_taken_up";
        case TaskFate::dropped_at_shift_end: return "dropped_at_shift_end";
        case TaskFate::dropped_nobody_free: return "dropped_nobody_free";
    }
    return "?";
}

std::string staff_model_problems(const StaffModel& model, const ShiftPattern& pattern) {
    std::string out;
    auto add = [&](const std::string& role, const std::string& text) {
        out += (out.empty() ? "" : "\n") + ("role '" + role + "': ") + text;
    };
    const std::size_t starts = pattern.start_minutes.size();
    auto check_row = [&](const Role& role, const std::vector<int>& row, const std::string& what) {
        if (row.size() != starts)
            add(role.name, what + " has " + std::to_string(row.size()) + " headcounts; expected " +
                               std::to_string(starts) + ", one per shift of the day");
        for (int h : row)
            if (h < 0) add(role.name, what + ": headcount must be >= 0 (got " + std::to_string(h) + ")");
    };
    if (model.roles.empty()) out = "no roles declared";
    if (model.unit_count == 0) add("-", "unit_count must be >= 1");
    for (const Role& role : model.roles) {
        if (role.name.empty()) add(role.name, "name is empty");
        check_row(role, role.roster.by_shift, "roster");
        if (!role.roster.by_weekday.empty()) {
            if (role.roster.by_weekday.size() != 7)
                add(role.name, "roster by weekday has " + std::to_string(role.roster.by_weekday.size()) +
                                   " rows; expected 7 (Monday to Sunday)");
            static constexpr const char* day_names[] = {"Monday", "Tuesday", "Wednesday", "Thursday",
                                                        "Friday", "Saturday", "Sunday"};
            for (std::size_t d = 0; d < role.roster.by_weekday.size() && d < 7; ++d)
                check_row(role, role.roster.by_weekday[d], std::string("roster for ") + day_names[d]);
        }
        if (std::string p = service_time_problem(role.minutes_per_task); !p.empty()) add(role.name, p);
        for (const OtherWorkClass& work : role.other_work) {
            const std::string what = "other work '" + work.name + "': ";
            if (work.name.empty()) add(role.name, "other work has an empty name");
            if (std::count_if(role.other_work.begin(), role.other_work.end(),
                              [&](const OtherWorkClass& w) { return w.name == work.name; }) > 1)
                add(role.name, what + "two classes have this name");
            for (double rate : work.per_hour)
                if (!(rate >= 0) || !std::isfinite(rate)) add(role.name, what + "rates must be finite and >= 0");
            if (std::string p = service_time_problem(work.minutes); !p.empty()) add(role.name, what + p);
        }
    }
    if (model.escalation.role_count() != model.roles.size())
        add("-", "the escalation graph has " + std::to_string(model.escalation.role_count()) + " roles; expected " +
                     std::to_string(model.roles.size()));
    return out;
}

std::vector<bool> roles_ever_staffed(std::span<const Role> roles) {
    std::vector<bool> out;
    for (const Role& role : roles) {
        bool any = std::any_of(role.roster.by_shift.begin(), role.roster.by_shift.end(), [](int h) { return h > 0; });
        if (!role.roster.by_weekday.empty()) {
            any = false;
            for (const auto& row : role.roster.by_weekday)
                any = any || std::any_of(row.begin(), row.end(), [](int h) { return h > 0; });
        }
        out.push_back(any);
    }
    return out;
}

namespace {

std::uint64_t minutes_entity(std::uint32_t encounter, Instant at, std::uint32_t occurrence, std::uint32_t step) {
    return entity_key({encounter, static_cast<std::uint64_t>(at), occurrence, step});
}

enum class Stage : std::uint8_t { waiting, working, overtime, done };

struct TaskState {
    Stage stage = Stage::waiting;
    std::uint32_t team = 0;
    std::uint32_t slot = 0;     // position in the team's `working` list
    Instant finish_at = 0;
    Instant overtime_since = 0;
    std::uint32_t occurrence = 0;  // earlier notices of the same encounter at the same instant
};

struct QueueEntry {
    std::uint8_t level;  // lower first: other work above alerts 0, alert tasks 1, other work below 2
    double order_score;  // higher first (0 under FIFO)
    Instant joined;
    std::uint32_t task;  // also breaks ties: tasks are numbered in notice order
    std::uint8_t escalations;  // stale when the task has moved on
};

// Max-heap comparator: returns true when a should be served after b.
struct ServedLater {
    bool operator()(const QueueEntry& a, const QueueEntry& b) const {
        if (a.level != b.level) return a.level > b.level;
        if (a.order_score != b.order_score) return a.order_score < b.order_score;
        if (a.joined != b.joined) return a.joined > b.joined;
        return a.task > b.task;
    }
};

struct Team {
    int on_duty = 0;
    int busy = 0;      // tasks held by staff of the current shift
    int overtime = 0;  // tasks being finished by staff whose shift has ended
    std::vector<QueueEntry> queue;  // heap; may hold stale entries
    int waiting = 0;                // live entries in queue
    std::vector<std::uint32_t> working;  // tasks of the current shift's staff
    std::vector<std::uint32_t> overtime_tasks;
    Instant last_change = 0;
    double busy_integral = 0.0;
    double waiting_integral = 0.0;
};

enum class EventKind : std::uint8_t { finish, escalation };
struct Event {
    EventKind kind;
    std::uint8_t escalations;  // for escalation: the step it was scheduled at
    std::uint32_t task;
};
constexpr int finish_priority = 0;
constexpr int escalation_priority = 1;
constexpr std::uint8_t alert_level = 1;

std::uint8_t queue_level(OtherWorkPriority priority) {
    switch (priority) {
        case OtherWorkPriority::above_alerts: return alert_level - 1;
        case OtherWorkPriority::with_alerts: return alert_level;
        case OtherWorkPriority::below_alerts: return alert_level + 1;
    }
    return alert_level;
}

// The staff on duty for one plan: shift changes, notices and the event queue of
// task finishes and escalation timeouts, merged in time order (see staff.hpp).
class StaffQueue {
public:
    StaffQueue(std::span<const Notice> notices, std::span<const OtherTask> other, const StaffModel& model,
               const StaffPlan& plan, const ShiftCalendar& calendar, Instant until, ReplicationSeed draws)
        : notices_(notices), other_(other), model_(model), plan_(plan), calendar_(calendar), until_(until),
          minutes_seed_(purpose_seed(draws.seed, draws.replication, StreamPurpose::task_minutes)) {
        team_base_.resize(model.roles.size());
        std::uint32_t teams = 0;
        for (std::size_t r = 0; r < model.roles.size(); ++r) {
            team_base_[r] = teams;
            teams += model.roles[r].per_unit ? model.unit_count : 1;
        }
        teams_.resize(teams);
        run_.start = calendar.shifts().front().start;
        run_.until = until;
        for (std::uint32_t r = 0; r < model.roles.size(); ++r)
            for (std::uint32_t u = 0; u < (model.roles[r].per_unit ? model.unit_count : 1); ++u)
                run_.teams.push_back(TeamLoad{r, u, 0.0, 0.0});
    }

    StaffRun run() {
        const std::size_t n = notices_.size();
        // Tasks of other work are numbered after the notices' (n, n + 1, ...).
        run_.tasks.resize(n + other_.size());
        state_.resize(n + other_.size());
        count_occurrences();
        now_ = run_.start;
        events_.start_at(now_);
        for (Team& t : teams_) t.last_change = now_;
        change_shift(0);

        const auto& shifts = calendar_.shifts();
        std::size_t next_shift = 1, next_notice = 0, next_other = 0;
        constexpr Instant never = std::numeric_limits<Instant>::max();
        for (;;) {
            const Instant t_shift = next_shift < shifts.size() ? shifts[next_shift].start : never;
            const Instant t_event = events_.empty() ? never : events_.next_at();
            const Instant t_notice = next_notice < n ? notices_[next_notice].at : never;
            const Instant t_other = next_other < other_.size() ? other_[next_other].at : never;
            const Instant t = std::min({t_shift, t_event, t_notice, t_other});
            if (t >= until_) break;
            assert(t >= now_ && "the clock never runs backwards");
            now_ = t;
            if (t_shift == t) {
                change_shift(next_shift++);
            } else if (t_event == t) {
                const auto e = events_.pop();
                if (e.payload.kind == EventKind::finish)
                    finish(e.payload.task);
                else
                    escalate(e.payload.task, e.payload.escalations);
            } else if (t_notice == t) {
                arrive(static_cast<std::uint32_t>(next_notice++));
            } else {
                arrive_other(static_cast<std::uint32_t>(next_other++));
            }
        }
        close();
        return std::move(run_);
    }

private:
    std::uint32_t team_of(std::uint32_t role, std::uint32_t unit) const {
        return team_base_[role] + (model_.roles[role].per_unit ? unit : 0);
    }

    void account(Team& team) {
        const double dt = static_cast<double>(now_ - team.last_change);
        team.busy_integral += dt * (team.busy + team.overtime);
        team.waiting_integral += dt * team.waiting;
        team.last_change = now_;
    }

    void arrive(std::uint32_t i) {
        const Notice& notice = notices_[i];
        TaskRecord& task = run_.tasks[i];
        task.created = notice.at;
        task.score = notice.score;
        task.notice = i;
        task.encounter = notice.encounter;
        task.unit = notice.unit;
        task.first_role = plan_.first_role;
        task.role = plan_.first_role;
        join(i);
    }

    void arrive_other(std::uint32_t k) {
        const OtherTask& work = other_[k];
        const auto i = static_cast<std::uint32_t>(notices_.size() + k);
        TaskRecord& task = run_.tasks[i];
        task.created = work.at;
        task.notice = k;
        task.unit = work.unit;
        task.first_role = work.role;
        task.role = work.role;
        join(i);
    }

    bool is_other(std::uint32_t i) const { return i >= notices_.size(); }

    // Where a waiting task stands in its team's queue (see staff.hpp).
    QueueEntry queue_entry(std::uint32_t i) const {
        const TaskRecord& task = run_.tasks[i];
        const bool by_score = plan_.discipline == QueueDiscipline::priority_by_score;
        if (!is_other(i)) return QueueEntry{alert_level, by_score ? task.score : 0.0, now_, i, task.escalations};
        const OtherTask& work = other_[i - notices_.size()];
        const double no_score = by_score ? -std::numeric_limits<double>::infinity() : 0.0;
        return QueueEntry{queue_level(model_.roles[work.role].other_work[work.work_class].priority), no_score, now_, i, 0};
    }

    // The task arrives at the team of its current role.
    void join(std::uint32_t i) {
        TaskRecord& task = run_.tasks[i];
        TaskState& st = state_[i];
        st.team = team_of(task.role, task.unit);
        Team& team = teams_[st.team];
        account(team);
        if (team.busy < team.on_duty) {
            start(i);
            return;
        }
        if (plan_.when_all_busy == WhenAllBusy::drop) {
            st.stage = Stage::done;
            task.fate = TaskFate::dropped_nobody_free;
            task.ended_at = now_;
            return;
        }
        st.stage = Stage::waiting;
        team.queue.push_back(queue_entry(i));
        std::push_heap(team.queue.begin(), team.queue.end(), ServedLater{});
        ++team.waiting;
        if (is_other(i)) return;  // other work never escalates
        if (const auto& step = model_.escalation.next(task.role))
            events_.schedule(now_ + step->timeout_seconds, escalation_priority,
                             Event{EventKind::escalation, task.escalations, i});
    }

    void start(std::uint32_t i) {
        TaskRecord& task = run_.tasks[i];
        TaskState& st = state_[i];
        Team& team = teams_[st.team];
        ++team.busy;
        st.stage = Stage::working;
        st.slot = static_cast<std::uint32_t>(team.working.size());
        team.working.push_back(i);
        task.started_at = now_;
        task.service_seconds = is_other(i) ? other_[i - notices_.size()].service_seconds : drawn_seconds(i, task);
        st.finish_at = now_ + task.service_seconds;
        events_.schedule(st.finish_at, finish_priority, Event{EventKind::finish, 0, i});
    }

    Seconds drawn_seconds(std::uint32_t i, const TaskRecord& task) const {
        // make_short_stream(draws, task_minutes, entity), with the part of the seed shared by every task computed once.
        SplitMixEngine engine{
            mix64(minutes_seed_ ^ minutes_entity(task.encounter, task.created, state_[i].occurrence, task.escalations))};
        return draw_seconds(model_.roles[task.role].minutes_per_task, engine);
    }

    // Notices are sorted by instant only; within one instant the same encounter
    // may come more than once (and not necessarily side by side).
    void count_occurrences() {
        std::vector<std::pair<std::uint32_t, std::uint32_t>> group;  // (encounter, notice) at one instant
        for (std::size_t first = 0, last = 0; first < notices_.size(); first = last) {
            last = first + 1;
            while (last < notices_.size() && notices_[last].at == notices_[first].at) ++last;
            if (last - first == 1) continue;
            group.clear();
            for (std::size_t i = first; i < last; ++i)
                group.emplace_back(notices_[i].encounter, static_cast<std::uint32_t>(i));
            std::sort(group.begin(), group.end());
            for (std::size_t k = 1; k < group.size(); ++k)
                if (group[k].first == group[k - 1].first)
                    state_[group[k].second].occurrence = state_[group[k - 1].second].occurrence + 1;
        }
    }

    void remove_working(Team& team, std::uint32_t i) {
        const std::uint32_t slot = state_[i].slot;
        team.working[slot] = team.working.back();
        state_[team.working[slot]].slot = slot;
        team.working.pop_back();
    }

    void take_up_waiting(Team& team) {
        while (team.busy < team.on_duty && team.waiting > 0) {
            std::pop_heap(team.queue.begin(), team.queue.end(), ServedLater{});
            const QueueEntry entry = team.queue.back();
            team.queue.pop_back();
            const TaskState& st = state_[entry.task];
            if (st.stage != Stage::waiting || run_.tasks[entry.task].escalations != entry.escalations) continue;
            --team.waiting;
            start(entry.task);
        }
    }

    void finish(std::uint32_t i) {
        TaskState& st = state_[i];
        if (st.stage != Stage::working && st.stage != Stage::overtime) return;  // dropped at shift end
        TaskRecord& task = run_.tasks[i];
        Team& team = teams_[st.team];
        account(team);
        task.ended_at = now_;
        task.fate = task.escalations > 0 ? TaskFate::escalated_then_finished : TaskFate::finished;
        if (st.stage == Stage::overtime) {
            task.overtime_seconds = now_ - st.overtime_since;
            --team.overtime;
            std::erase(team.overtime_tasks, i);
        } else {
            --team.busy;
            remove_working(team, i);
        }
        st.stage = Stage::done;
        take_up_waiting(team);
    }

    void escalate(std::uint32_t i, std::uint8_t scheduled_at_step) {
        TaskState& st = state_[i];
        TaskRecord& task = run_.tasks[i];
        if (st.stage != Stage::waiting || task.escalations != scheduled_at_step) return;  // taken up meanwhile
        Team& team = teams_[st.team];
        account(team);
        --team.waiting;  // its queue entry is now stale
        task.role = model_.escalation.next(task.role)->to_role;
        ++task.escalations;
        join(i);
    }

    void change_shift(std::size_t shift_index) {
        const Shift& shift = calendar_.shifts()[shift_index];
        for (std::uint32_t r = 0; r < model_.roles.size(); ++r) {
            const int heads = headcount(model_.roles[r].roster, shift);
            for (std::uint32_t u = 0; u < (model_.roles[r].per_unit ? model_.unit_count : 1); ++u) {
                Team& team = teams_[team_base_[r] + u];
                account(team);
                hand_over_or_drop(team, heads);
                team.on_duty = heads;
                take_up_waiting(team);
            }
        }
    }

    void to_overtime(Team& team, std::uint32_t i) {
        state_[i].stage = Stage::overtime;
        state_[i].overtime_since = now_;
        team.overtime_tasks.push_back(i);
        ++team.overtime;
    }

    void hand_over_or_drop(Team& team, int incoming) {
        if (team.working.empty()) return;
        // Work ending exactly now is finished by the outgoing member (0 s overtime).
        std::vector<std::uint32_t> open;
        for (std::uint32_t i : team.working) {
            if (state_[i].finish_at <= now_)
                to_overtime(team, i);
            else
                open.push_back(i);
        }
        team.working.clear();
        team.busy = 0;
        if (plan_.at_shift_end == ShiftEndPolicy::drop) {
            for (std::uint32_t i : open) {
                state_[i].stage = Stage::done;
                run_.tasks[i].fate = TaskFate::dropped_at_shift_end;
                run_.tasks[i].ended_at = now_;
            }
            return;
        }
        // Outgoing staff finish the tasks nearest completion; the rest are handed over.
        std::sort(open.begin(), open.end(), [&](std::uint32_t a, std::uint32_t b) {
            return state_[a].finish_at != state_[b].finish_at ? state_[a].finish_at < state_[b].finish_at : a < b;
        });
        const std::size_t kept = open.size() > static_cast<std::size_t>(incoming)
                                     ? open.size() - static_cast<std::size_t>(incoming)
                                     : 0;
        for (std::size_t k = 0; k < open.size(); ++k) {
            const std::uint32_t i = open[k];
            if (k < kept) {
                to_overtime(team, i);
                continue;
            }
            run_.tasks[i].handed_over = true;
            state_[i].slot = static_cast<std::uint32_t>(team.working.size());
            team.working.push_back(i);
            ++team.busy;
        }
    }

    void close() {
        now_ = until_;
        for (std::size_t k = 0; k < teams_.size(); ++k) {
            account(teams_[k]);
            run_.teams[k].busy_staff_seconds = teams_[k].busy_integral;
            run_.teams[k].waiting_task_seconds = teams_[k].waiting_integral;
        }
        for (std::size_t i = 0; i < state_.size(); ++i) {
            TaskRecord& task = run_.tasks[i];
            switch (state_[i].stage) {
                case Stage::waiting:
                    task.fate = TaskFate::never_taken_up;
                    task.ended_at = until_;
                    break;
                case Stage::overtime:
                    task.overtime_seconds = until_ - state_[i].overtime_since;
                    [[fallthrough]];
                case Stage::working:
                    task.fate = TaskFate::in_progress_at_end;
                    task.ended_at = until_;
                    break;
                case Stage::done: break;
            }
        }
        const auto n = static_cast<std::ptrdiff_t>(notices_.size());
        run_.other_tasks.assign(run_.tasks.begin() + n, run_.tasks.end());
        run_.tasks.erase(run_.tasks.begin() + n, run_.tasks.end());
    }

    std::span<const Notice> notices_;
    std::span<const OtherTask> other_;
    const StaffModel& model_;
    const StaffPlan& plan_;
    const ShiftCalendar& calendar_;
    Instant until_;
    std::uint64_t minutes_seed_;
    std::vector<std::uint32_t> team_base_;  // per role: index of its first team
    std::vector<Team> teams_;
    std::vector<TaskState> state_;
    EventQueue<Event> events_;
    Instant now_ = 0;
    StaffRun run_;
};

}  // namespace

StaffRun simulate_staff(std::span<const Notice> notices, const StaffModel& model, const StaffPlan& plan,
                        const ShiftCalendar& calendar, Instant until, ReplicationSeed draws) {
    return simulate_staff(notices, {}, model, plan, calendar, until, draws);
}

namespace {

void check_other_work(std::span<const OtherTask> other, const StaffModel& model, const ShiftCalendar& calendar,
                      Instant until) {
    for (std::size_t k = 0; k < other.size(); ++k) {
        const OtherTask& w = other[k];
        const std::string which = "staff: other-work task " + std::to_string(k);
        if (k > 0 && w.at < other[k - 1].at)
            throw std::invalid_argument(which + " at " + format_utc(w.at) + " comes before the one ahead of it; sort by time");
        if (w.at < calendar.shifts().front().start || w.at >= until)
            throw std::invalid_argument(which + " at " + format_utc(w.at) + " lies outside the run");
        if (w.role >= model.roles.size() || w.work_class >= model.roles[w.role].other_work.size() ||
            w.unit >= (model.roles[w.role].per_unit ? model.unit_count : 1u) || w.service_seconds < 0)
            throw std::invalid_argument(which + " names no declared role, unit and class, or has negative minutes");
    }
}

}  // namespace

StaffRun simulate_staff(std::span<const Notice> notices, std::span<const OtherTask> other_work,
                        const StaffModel& model, const StaffPlan& plan, const ShiftCalendar& calendar, Instant until,
                        ReplicationSeed draws) {
    if (std::string p = staff_model_problems(model, calendar.pattern()); !p.empty())
        throw std::invalid_argument("staff model: " + p);
    if (plan.first_role >= model.roles.size())
        throw std::invalid_argument("staff plan: first_role " + std::to_string(plan.first_role) +
                                    " is not a declared role");
    if (calendar.size() == 0) throw std::invalid_argument("staff: the shift calendar is empty");
    if (until > calendar.shifts().back().end)
        throw std::invalid_argument("staff: the run ends after the shift calendar (" + format_utc(until) + " > " +
                                    format_utc(calendar.shifts().back().end) + ")");
    if (notices.size() >= std::numeric_limits<std::uint32_t>::max())
        throw std::invalid_argument("staff: too many notices for one plan");
    for (std::size_t i = 0; i < notices.size(); ++i) {
        const Notice& n = notices[i];
        if (i > 0 && n.at < notices[i - 1].at)
            throw std::invalid_argument("staff: notices must be sorted by time; notice " + std::to_string(i) +
                                        " at " + format_utc(n.at) + " comes after one at " +
                                        format_utc(notices[i - 1].at));
        if (n.at < calendar.shifts().front().start || n.at >= until)
            throw std::invalid_argument("staff: notice " + std::to_string(i) + " at " + format_utc(n.at) +
                                        " lies outside the run [" + format_utc(calendar.shifts().front().start) +
                                        ", " + format_utc(until) + ")");
        if (n.unit >= model.unit_count)
            throw std::invalid_argument("staff: notice " + std::to_string(i) + " names unit " +
                                        std::to_string(n.unit) + " but the staff model has " +
                                        std::to_string(model.unit_count) + " units");
    }
    check_other_work(other_work, model, calendar, until);
    if (notices.size() + other_work.size() >= std::numeric_limits<std::uint32_t>::max())
        throw std::invalid_argument("staff: too many tasks for one plan");
    return StaffQueue(notices, other_work, model, plan, calendar, until, draws).run();
}

std::uint64_t task_minutes_entity(std::uint32_t encounter, Instant at, std::uint32_t occurrence,
                                  std::uint32_t escalation_step) {
    return minutes_entity(encounter, at, occurrence, escalation_step);
}

}  // namespace tocsin
