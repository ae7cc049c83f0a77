#include "undertow/sweep/shard.hpp"

#include <cstdlib>
#include <string>

#include "undertow/error.hpp"

namespace undertow::sweep {
namespace {

std::optional<long long> env_number(const char* name) {
  const char* v = std::getenv(name);
  if (!v || !*v) return std::nullopt;
  char* end = nullptr;
  const long long x = std::strtoll(v, &end, 10);
  if (*end != '\0' || x < 0)
    throw InputError(SourcePlace{"environment", 0, 0, name},
                     std::string("must be a whole number, got \"") + v + "\"");
  return x;
}

} // namespace

std::vector<std::size_t> shard_points(std::size_t points, Shard s) {
  std::vector<std::size_t> out;
  if (s.count == 0) return out;
  for (std::size_t i = s.index; i < points; i += s.count)
    out.push_back(i);
  return out;
}

std::optional<Shard> shard_from_environment() {
  const auto id = env_number("SLURM_ARRAY_TASK_ID");
  if (!id) return std::nullopt;
  const auto count = env_number("SLURM_ARRAY_TASK_COUNT");
  if (!count || *count < 1)
    throw InputError(SourcePlace{"environment", 0, 0, "SLURM_ARRAY_TASK_COUNT"},
                     "missing beside SLURM_ARRAY_TASK_ID (submit with `undertow sweep slurm`)");
  const long long min = env_number("SLURM_ARRAY_TASK_MIN").value_or(0);
  const long long k = *id - min;
  if (k < 0 || k >= *count)
    throw InputError(SourcePlace{"environment", 0, 0, "SLURM_ARRAY_TASK_ID"},
                     "task " + std::to_string(*id) + " is outside the array " +
                         std::to_string(min) + "-" + std::to_string(min + *count - 1) +
                         "; the array must be contiguous (no step such as :2)");
  return Shard{std::size_t(k), std::size_t(*count)};
}

int threads_from_environment() {
  if (const auto n = env_number("SLURM_CPUS_PER_TASK"); n && *n > 0)
    return int(std::min<long long>(*n, 4096));
  // OMP_NUM_THREADS may list nested levels ("4,2"): the first is ours; OpenMP reads the rest.
  if (const char* v = std::getenv("OMP_NUM_THREADS")) {
    const long long n = std::strtoll(v, nullptr, 10);
    if (n > 0) return int(std::min<long long>(n, 4096));
  }
  return 0;
}

} // namespace undertow::sweep
