#include "sim/notice.hpp"

namespace tocsin {

std::string_view to_string(Channel channel) {
    switch (channel) {
        case Channel::page: return "page";
        case Channel::chart_interruption: return "chart_interruption";
        case Channel::handoff_list: return "handoff_list";
        case Channel::ranked_review: return "ranked_review";
        case Channel::score_lookup: return "score_lookup";
    }
    return "?";
}

std::string_view to_string(NoticeReason reason) {
    switch (reason) {
        case NoticeReason::first: return "first";
        case NoticeReason::repeat: return "repeat";
        case NoticeReason::rise: return "rise";
        case NoticeReason::looked_up: return "looked_up";
    }
    return "?";
}

}  // namespace tocsin
