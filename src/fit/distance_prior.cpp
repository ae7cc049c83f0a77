#include "undertow/fit/distance_prior.hpp"

#include <algorithm>
#include <cmath>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"
#include "undertow/io/input_table.hpp"

namespace undertow::fit {

void DistancePrior::validate() const {
  const auto bad = [](const char* key, const std::string& why) {
    throw InputError(SourcePlace{{}, 0, 0, key}, why);
  };
  if (!(distance_min_kpc >= 0) || !std::isfinite(distance_min_kpc))
    bad("distance_min_kpc", "must be a finite number >= 0");
  if (!(distance_max_kpc > distance_min_kpc) || !std::isfinite(distance_max_kpc))
    bad("distance_max_kpc", "must be finite and larger than distance_min_kpc");
  if (!(parallax_snr_min >= 0)) bad("parallax_snr_min", "must not be negative");
  if (kind == Kind::edsd && !(edsd_length_kpc > 0)) bad("edsd_length_kpc", "must be positive");
  if (kind == Kind::disk && !(disk_scale_length_kpc > 0))
    bad("disk_scale_length_kpc", "must be positive");
  if (kind == Kind::disk && !(disk_scale_height_kpc > 0))
    bad("disk_scale_height_kpc", "must be positive");
  if (kind == Kind::table) {
    if (table_distance_kpc.size() < 2 || table_distance_kpc.size() != table_ln_density.size())
      bad("density_table", "needs at least two rows");
    for (std::size_t i = 1; i < table_distance_kpc.size(); ++i)
      if (!(table_distance_kpc[i] > table_distance_kpc[i - 1]))
        bad("density_table", "distances must increase");
    if (table_distance_kpc.front() > distance_min_kpc ||
        table_distance_kpc.back() < distance_max_kpc)
      bad("density_table", "must cover distance_min_kpc to distance_max_kpc");
  }
}

double DistancePrior::ln_density(double d, double R, double z) const {
  switch (kind) {
  case Kind::uniform:
    return 0;
  case Kind::disk:
    return -R / disk_scale_length_kpc - std::fabs(z) / disk_scale_height_kpc;
  case Kind::edsd:
    return -d / edsd_length_kpc;
  case Kind::table: {
    const auto& x = table_distance_kpc;
    const auto it = std::upper_bound(x.begin(), x.end(), d);
    const std::size_t i = std::clamp<std::size_t>(std::size_t(it - x.begin()), 1, x.size() - 1);
    const double f = (d - x[i - 1]) / (x[i] - x[i - 1]);
    return table_ln_density[i - 1] + f * (table_ln_density[i] - table_ln_density[i - 1]);
  }
  }
  return 0;
}

DistancePrior::Kind distance_prior_from_name(const std::string& n) {
  if (n == "uniform") return DistancePrior::Kind::uniform;
  if (n == "disk") return DistancePrior::Kind::disk;
  if (n == "edsd") return DistancePrior::Kind::edsd;
  if (n == "table") return DistancePrior::Kind::table;
  throw InputError("unknown distance prior '" + n + "' (uniform, disk, edsd, table)");
}

std::string distance_prior_name(DistancePrior::Kind k) {
  switch (k) {
  case DistancePrior::Kind::uniform:
    return "uniform";
  case DistancePrior::Kind::disk:
    return "disk";
  case DistancePrior::Kind::edsd:
    return "edsd";
  case DistancePrior::Kind::table:
    return "table";
  }
  return "?";
}

void read_density_table(const std::string& path, DistancePrior& p) {
  const auto t = io::InputTable::read_file(path);
  const std::size_t cd = t.column("distance_kpc"), cr = t.column("density");
  p.table_distance_kpc.clear();
  p.table_ln_density.clear();
  for (std::size_t r = 0; r < t.rows(); ++r) {
    const double d = t.number(r, cd), rho = t.number(r, cr);
    if (!(rho > 0)) throw InputError(t.place(r, cr), "a density must be positive");
    if (!p.table_distance_kpc.empty() && !(d > p.table_distance_kpc.back()))
      throw InputError(t.place(r, cd), "distances must increase");
    p.table_distance_kpc.push_back(d);
    p.table_ln_density.push_back(std::log(rho));
  }
  if (p.table_distance_kpc.size() < 2)
    throw InputError(SourcePlace{path, 0, 0, {}}, "a density table needs at least two rows");
}

} // namespace undertow::fit
