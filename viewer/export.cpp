#include "export.h"

#include <nlohmann/json.hpp>

#include <cmath>
#include <sstream>

#include "machcut/common/limits.h"
#include "machcut/output/writers.h"

namespace machcut::view {

namespace {
std::string num(double v) { return std::isfinite(v) ? format_number(v) : std::string(); }
}  // namespace

std::string curve_csv(const CurveResult& c) {
  std::ostringstream s;
  s << "x_m,area_m2,sears_haack_m2,slope_m2_per_m\n";
  for (std::size_t i = 0; i < c.curve.x.size(); ++i) {
    s << num(c.curve.x[i]) << "," << num(c.curve.area[i]) << ","
      << (i < c.sears_haack.size() ? num(c.sears_haack[i]) : "") << ","
      << (i < c.slope.size() ? num(c.slope[i]) : "") << "\n";
  }
  return s.str();
}

std::string drag_csv(const DragResult& d) {
  std::ostringstream s;
  s << "roll_deg,dq_m2\n";
  for (std::size_t i = 0; i < d.roll_deg.size(); ++i) s << num(d.roll_deg[i]) << "," << num(d.roll_dq[i]) << "\n";
  s << "\nmach,dq_m2\n";
  for (std::size_t i = 0; i < d.mach_values.size(); ++i) s << num(d.mach_values[i]) << "," << num(d.mach_dq[i]) << "\n";
  return s.str();
}

std::string drag_json(const DragResult& d, const std::vector<std::string>& files) {
  nlohmann::json j;
  j["files"] = files;
  j["caution"] = kCaution;
  j["method"] = d.note;
  j["units"] = {{"dq", "m^2"}, {"roll", "deg"}};
  j["mach"] = d.mach;
  j["dq_roll_average_m2"] = d.total_dq >= 0 ? nlohmann::json(d.total_dq) : nlohmann::json(nullptr);
  nlohmann::json rolls = nlohmann::json::array();
  for (std::size_t i = 0; i < d.roll_deg.size(); ++i)
    rolls.push_back({{"roll_deg", d.roll_deg[i]}, {"dq_m2", std::isfinite(d.roll_dq[i]) ? nlohmann::json(d.roll_dq[i]) : nlohmann::json(nullptr)}});
  j["per_roll"] = rolls;
  nlohmann::json machs = nlohmann::json::array();
  for (std::size_t i = 0; i < d.mach_values.size(); ++i)
    machs.push_back({{"mach", d.mach_values[i]},
                     {"dq_m2", std::isfinite(d.mach_dq[i]) ? nlohmann::json(d.mach_dq[i]) : nlohmann::json(nullptr)},
                     {"resolution_limited", i < d.mach_limited.size() && d.mach_limited[i]}});
  j["against_mach"] = machs;
  // Resolution and validity at `mach`, named as in the JSON (results[].validity).
  j["resolution_limited"] = d.resolution_limited;
  j["time_limited"] = d.time_limited;
  j["growth_per_halving_m2"] = d.growth_per_halving;
  j["length_floor_m"] = d.length_floor;
  nlohmann::json features = nlohmann::json::array();
  for (const FeatureView& f : d.features)
    features.push_back({{"part", f.part},
                        {"x_from", f.x_from},
                        {"x_to", f.x_to},
                        {"frontal_area", f.frontal_area},
                        {"drag_share", std::isfinite(f.drag_share) ? nlohmann::json(f.drag_share) : nlohmann::json(nullptr)}});
  j["validity"] = {{"features", features}, {"advice", d.advice}};
  return j.dump(2) + "\n";
}

}  // namespace machcut::view
