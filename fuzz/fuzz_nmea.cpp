// libFuzzer target for the NMEA 0183 decoder: any bytes must give a Reason without crashing,
// hanging or undefined behaviour, and the decoded values must respect their documented ranges.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <variant>

#include "decode/instrument_clock.hpp"
#include "decode/nmea.hpp"

namespace {

using namespace sg::decode;

void check(bool ok) {
    if (!ok) __builtin_trap();
}

void checkLatLon(const std::optional<double>& lat, const std::optional<double>& lon) {
    if (lat) check(std::isfinite(*lat) && std::abs(*lat) <= 90.0);
    if (lon) check(std::isfinite(*lon) && std::abs(*lon) <= 180.0);
}

void checkTod(const std::optional<double>& t) {
    if (t) check(*t >= 0.0 && *t < 86401.0);
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string_view line(reinterpret_cast<const char*>(data), size);
    const NmeaSentence s = decodeNmea(line);
    check(static_cast<int>(s.reason) < kReasonCount);
    check(!reasonName(s.reason).empty());
    // Data is present exactly for usable sentences of a known type.
    if (!isUsable(s.reason)) check(std::holds_alternative<std::monostate>(s.data));
    if (isUsable(s.reason)) check(!std::holds_alternative<std::monostate>(s.data));
    // An ignored field is named, and only a checksummed sentence is field_ignored.
    if (s.reason == Reason::FieldIgnored) check(!s.detail.empty() && s.checksum_ok);
    // With the per-source checksum rule on, only a sentence without a checksum changes reason.
    const NmeaSentence strict = decodeNmea(line, true);
    if (strict.reason != s.reason) {
        check(strict.reason == Reason::MissingChecksum && !s.checksum_ok);
    }
    // Exempt talkers (checksum_optional_talkers) only ever lift that rejection: with the rule on,
    // a line changes reason only from MissingChecksum back to what the rule-free decoder said.
    static const std::string kExempt[] = {"GP", "HE"};
    const NmeaSentence exempt = decodeNmea(line, true, kExempt);
    if (exempt.reason != strict.reason) {
        check(strict.reason == Reason::MissingChecksum && exempt.reason == s.reason);
    }
    if (const auto* g = std::get_if<Gga>(&s.data)) {
        checkLatLon(g->lat_deg, g->lon_deg);
        checkTod(g->tod_s);
        check(g->quality >= 0 && g->quality <= 8);
    } else if (const auto* r = std::get_if<Rmc>(&s.data)) {
        checkLatLon(r->lat_deg, r->lon_deg);
        checkTod(r->tod_s);
        if (r->date) check(isValidDate(*r->date));
        if (r->sog_mps) check(*r->sog_mps >= 0.0);
        if (r->mag_var_deg) check(std::abs(*r->mag_var_deg) <= 180.0);
    } else if (const auto* n = std::get_if<Gns>(&s.data)) {
        checkLatLon(n->lat_deg, n->lon_deg);
    } else if (const auto* l = std::get_if<Gll>(&s.data)) {
        checkLatLon(l->lat_deg, l->lon_deg);
    } else if (const auto* h = std::get_if<Hdt>(&s.data)) {
        check(h->heading_deg >= 0.0 && h->heading_deg <= 360.0);
    } else if (const auto* z = std::get_if<Zda>(&s.data)) {
        check(isValidDate(z->date));
    }
    // The clock must accept whatever the decoder produced.
    InstrumentClock clock;
    clock.observe(s);
    if (clock.hasDate()) {
        const auto t = clock.toUtc(43200.0);
        check(t.has_value());
    }
    return 0;
}
