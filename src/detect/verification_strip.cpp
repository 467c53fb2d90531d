// Verification strip: predicted against measured peaks over known items; see
// verification_strip.hpp.
#include "detect/verification_strip.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "common/config_section.hpp"

namespace sg::detect {

std::vector<KnownItem> parseKnownItems(const config::Section& root, const toml::table& raw,
                                       const std::vector<TargetClass>& classes) {
    std::vector<KnownItem> out;
    const auto* raw_items = raw["known_item"].as_array();
    std::size_t index = 0;
    for (const config::Section& s : root.tables("known_item")) {
        s.allowOnly({"name", "lon_lat_deg", "grid_m", "target", "burial_m", "lines"});
        KnownItem it;
        it.key = fmt::format("known_item[{}]", index);
        it.file = s.file();
        const toml::table* t = raw_items != nullptr && index < raw_items->size()
                                   ? raw_items->get(index)->as_table()
                                   : nullptr;
        ++index;
        if (t != nullptr && t->contains("lines")) {
            const char* expected = "a non-empty array of distinct plan line names (strings), e.g. [\"BB07\"]";
            const auto* a = (*t)["lines"].as_array();
            if (a == nullptr || a->empty()) s.fail("lines", expected);
            for (const auto& el : *a) {
                const auto* v = el.as_string();
                if (v == nullptr || v->get().empty() ||
                    std::find(it.lines.begin(), it.lines.end(), v->get()) != it.lines.end())
                    s.fail("lines", expected);
                it.lines.push_back(v->get());
            }
        }
        it.name = s.string("name");
        const auto ll = s.optionalNumbers("lon_lat_deg", 2);
        const auto en = s.optionalNumbers("grid_m", 2);
        if (ll.has_value() == en.has_value())
            s.fail(ll ? "grid_m" : "lon_lat_deg", "exactly one of lon_lat_deg = [lon, lat] or grid_m = [E, N]");
        if (ll) {
            if (std::abs((*ll)[0]) > 180.0 || std::abs((*ll)[1]) > 90.0)
                s.fail("lon_lat_deg", "[longitude in [-180, 180], latitude in [-90, 90]] degrees");
            it.lon_deg = (*ll)[0];
            it.lat_deg = (*ll)[1];
        } else {
            it.grid_e_m = (*en)[0];
            it.grid_n_m = (*en)[1];
        }
        it.target_class = s.string("target");
        const auto cls = std::find_if(classes.begin(), classes.end(),
                                      [&](const TargetClass& c) { return c.name == it.target_class; });
        if (cls == classes.end()) s.fail("target", "the name of a [[target]]");
        it.burial_m = s.number("burial_m", 0.0, 50.0, cls->burial_m);
        out.push_back(std::move(it));
    }
    return out;
}

void VerificationStrip::place(std::size_t item, double easting_m, double northing_m) {
    if (m_pos.size() < m_items.size()) m_pos.resize(m_items.size());
    if (item < m_pos.size()) m_pos[item] = std::make_pair(easting_m, northing_m);
}

void VerificationStrip::add(const DetrendedSample& d) {
    if (!d.s.usable || d.s.run < 0) return;
    for (std::size_t i = 0; i < m_pos.size(); ++i) {
        if (!m_pos[i]) continue;
        const double de = m_pos[i]->first - d.s.easting_m;
        const double dn = m_pos[i]->second - d.s.northing_m;
        const double dist = std::hypot(de, dn);
        if (dist > kVerificationGate_m) continue;
        Track& t = m_tracks[{i, d.s.run, d.s.slot}];
        if (dist < t.min_dist_m) {
            t.min_dist_m = dist;
            t.closest = d;
        }
        // The measured peak: within twice the vertical distance (plus 2 m) of the item, where a
        // point dipole's peak lies for any field direction (the team's window).
        const double vertical = d.s.altitude_m + m_items[i].burial_m;
        if (dist <= 2.0 * vertical + 2.0) t.max_abs_nT = std::max(t.max_abs_nT, std::abs(d.residual_nT));
    }
}

VerificationResult VerificationStrip::result(const std::vector<TargetModel>& models,
                                             const std::vector<std::string>& run_lines,
                                             const std::vector<std::string>& plan_lines,
                                             const std::vector<VerificationPass>& prior, int session) const {
    VerificationResult out;
    out.passes = prior;
    for (std::size_t i = 0; i < m_items.size(); ++i) {
        if (!placed(i)) out.unplaced.push_back(m_items[i].name);
        if (plan_lines.empty()) continue;
        for (const auto& l : m_items[i].lines)
            if (std::find(plan_lines.begin(), plan_lines.end(), l) == plan_lines.end())
                out.notes.push_back(fmt::format("{}: {}.lines: '{}' is no line of the plan (item '{}')",
                                                m_items[i].file, m_items[i].key, l, m_items[i].name));
    }
    std::map<std::pair<std::size_t, std::string>, int> apart;  // (item, line) -> passes not counted
    std::map<std::string, std::vector<const VerificationPass*>> by_class;
    for (const auto& [key, t] : m_tracks) {
        const auto [item_index, run, slot] = key;
        const KnownItem& item = m_items[item_index];
        const TargetModel* model = nullptr;
        for (const auto& m : models)
            if (m.targetClass().name == item.target_class) model = &m;
        if (model == nullptr) continue;
        const auto& s = t.closest.s;
        // A pass whose closest approach lies at the gate's edge never came near: skip it.
        if (t.min_dist_m >= kVerificationGate_m) continue;
        VerificationPass p;
        p.item = item.name;
        p.target_class = item.target_class;
        p.run = run;
        p.session = session;
        p.sensor_slot = slot;
        p.t_ns = s.t_ns;
        const double de = m_pos[item_index]->first - s.easting_m;
        const double dn = m_pos[item_index]->second - s.northing_m;
        // Starboard of a grid heading th is (cos th, -sin th) in (east, north).
        p.offset_m = de * std::cos(s.heading_grid_rad) - dn * std::sin(s.heading_grid_rad);
        p.altitude_m = s.altitude_m;
        p.vertical_m = std::max(0.01, s.altitude_m + item.burial_m);
        const double heading_true = s.heading_grid_rad + s.convergence_rad;
        p.heading_true_deg = std::fmod(heading_true * 180.0 / kPi + 720.0, 360.0);
        p.threshold_nT = s.threshold_nT;
        p.predicted_nT = model->peakAnomalyDirect_nT(p.vertical_m, p.offset_m, heading_true);
        p.measured_nT = t.max_abs_nT;
        p.ratio = p.predicted_nT > 0.0 ? p.measured_nT / p.predicted_nT : 0.0;
        p.predicted_detected = p.predicted_nT >= p.threshold_nT;
        p.detected = p.measured_nT >= p.threshold_nT;
        if (run >= 0 && static_cast<std::size_t>(run) < run_lines.size()) p.line = run_lines[static_cast<std::size_t>(run)];
        if (!item.lines.empty() && std::find(item.lines.begin(), item.lines.end(), p.line) == item.lines.end()) {
            p.on_named_line = false;
            ++apart[{item_index, p.line}];
        }
        out.passes.push_back(p);
    }
    for (const auto& [key, n] : apart) {
        const KnownItem& item = m_items[key.first];
        std::string named;
        for (const auto& l : item.lines) named += (named.empty() ? "" : ", ") + l;
        out.notes.push_back(fmt::format("'{}': {} pass(es) on {} (not among its lines: {}) reported apart, "
                                        "not used in the verdict",
                                        item.name, n, key.second.empty() ? "no plan line" : "line " + key.second,
                                        named));
    }
    for (const auto& p : out.passes)
        if (p.predicted_detected && p.on_named_line) by_class[p.target_class].push_back(&p);
    // Classes with known items but no usable pass still get a verdict line.
    for (const auto& it : m_items) by_class.try_emplace(it.target_class);
    for (auto& [name, passes] : by_class) {
        ClassVerdict v;
        v.target_class = name;
        v.passes_used = static_cast<int>(passes.size());
        std::vector<double> ratios;
        for (const auto* p : passes) {
            ratios.push_back(p->ratio);
            if (p->detected) ++v.passes_detected;
        }
        if (ratios.size() < 3) {
            v.verdict = "not_enough_passes";
            v.text = fmt::format("{}: {} pass(es) where the model predicts a detection; at least 3 are "
                                 "needed for a verdict",
                                 name, ratios.size());
            out.verdicts.push_back(v);
            continue;
        }
        std::sort(ratios.begin(), ratios.end());
        const std::size_t n = ratios.size();
        v.median_ratio = n % 2 == 1 ? ratios[n / 2] : 0.5 * (ratios[n / 2 - 1] + ratios[n / 2]);
        const TargetModel* model = nullptr;
        for (const auto& m : models)
            if (m.targetClass().name == name) model = &m;
        if (v.median_ratio < 1.0 - kVerificationTolerance) {
            v.verdict = "too_optimistic";
            const auto& cls = model->targetClass();
            if (cls.model == ModelKind::MassRule) {
                v.corrected_mass_kg = cls.mass_kg * v.median_ratio;
                v.correction = fmt::format("mass_kg = {:.4g} (was {:.4g})", *v.corrected_mass_kg, cls.mass_kg);
            } else {
                v.corrected_moment_Am2 = model->moment_Am2() * v.median_ratio;
                v.correction = fmt::format("moment_Am2 = {:.4g} (was {:.4g})", *v.corrected_moment_Am2,
                                           model->moment_Am2());
            }
            v.text = fmt::format("{}: model too optimistic: measured peaks are {:.0f} % below the prediction "
                                 "(median ratio {:.2f} over {} passes); the coverage claimed for this class "
                                 "must shrink: set {}",
                                 name, (1.0 - v.median_ratio) * 100.0, v.median_ratio, n, v.correction);
        } else if (v.median_ratio > 1.0 + kVerificationTolerance) {
            v.verdict = "conservative";
            v.text = fmt::format("{}: model conservative: measured peaks are {:.0f} % above the prediction "
                                 "(median ratio {:.2f} over {} passes); the coverage shown is on the safe side",
                                 name, (v.median_ratio - 1.0) * 100.0, v.median_ratio, n);
        } else {
            v.verdict = "confirmed";
            v.text = fmt::format("{}: model confirmed: median measured/predicted {:.2f} over {} passes "
                                 "(within {:.0f} %)",
                                 name, v.median_ratio, n, kVerificationTolerance * 100.0);
        }
        out.verdicts.push_back(v);
    }
    return out;
}

}  // namespace sg::detect
