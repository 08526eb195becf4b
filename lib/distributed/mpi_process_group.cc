#include "distributed/mpi_process_group.h"

#include <mpi.h>

#include <algorithm>
#include <climits>
#include <cstdlib>
#include <numeric>

#include "common/error.h"

namespace loupe {

namespace {

// MPI counts are int: long arrays go in pieces of at most this many elements.
constexpr std::size_t kPiece = std::size_t{1} << 28;

void check(int code, const char* what) {
  if (code == MPI_SUCCESS) return;
  char text[MPI_MAX_ERROR_STRING];
  int length = 0;
  MPI_Error_string(code, text, &length);
  throw Error(std::string("MPI ") + what + " failed: " + std::string(text, static_cast<std::size_t>(length)));
}

template <typename T>
void sum_in_pieces(T* data, std::size_t count, MPI_Datatype type) {
  for (std::size_t at = 0; at < count; at += kPiece) {
    const auto piece = static_cast<int>(std::min(kPiece, count - at));
    check(MPI_Allreduce(MPI_IN_PLACE, data + at, piece, type, MPI_SUM, MPI_COMM_WORLD), "all-reduce");
  }
}

// Element counts of every process, then displacements; fails past INT_MAX elements.
std::vector<int> counts_of_all(std::size_t mine, std::size_t size) {
  if (mine > static_cast<std::size_t>(INT_MAX)) throw Error("MPI gather: a share of more than 2^31 values");
  int count = static_cast<int>(mine);
  std::vector<int> counts(size);
  check(MPI_Allgather(&count, 1, MPI_INT, counts.data(), 1, MPI_INT, MPI_COMM_WORLD), "all-gather");
  return counts;
}

std::vector<int> displacements_of(const std::vector<int>& counts) {
  std::vector<int> at(counts.size(), 0);
  long long total = 0;
  for (std::size_t r = 0; r < counts.size(); ++r) {
    if (total > INT_MAX) throw Error("MPI gather: more than 2^31 values in all");
    at[r] = static_cast<int>(total);
    total += counts[r];
  }
  if (total > INT_MAX) throw Error("MPI gather: more than 2^31 values in all");
  return at;
}

template <typename T>
std::vector<T> all_gather_of(std::span<const T> values, std::size_t size, MPI_Datatype type) {
  const auto counts = counts_of_all(values.size(), size);
  const auto at = displacements_of(counts);
  std::vector<T> all(static_cast<std::size_t>(at.back()) + static_cast<std::size_t>(counts.back()));
  check(MPI_Allgatherv(values.data(), static_cast<int>(values.size()), type, all.data(), counts.data(), at.data(), type,
                       MPI_COMM_WORLD),
        "all-gather");
  return all;
}

}  // namespace

MpiProcessGroup::MpiProcessGroup() {
  int rank = 0;
  int size = 1;
  MPI_Comm_rank(MPI_COMM_WORLD, &rank);
  MPI_Comm_size(MPI_COMM_WORLD, &size);
  rank_ = static_cast<std::size_t>(rank);
  size_ = static_cast<std::size_t>(size);
}

void MpiProcessGroup::sum(std::span<std::uint32_t> values) {
  sum_in_pieces(values.data(), values.size(), MPI_UINT32_T);
}

void MpiProcessGroup::sum(std::span<std::uint64_t> values) {
  sum_in_pieces(values.data(), values.size(), MPI_UINT64_T);
}

void MpiProcessGroup::sum(std::span<double> values) {
  // Gathered and added in rank order: the same bits on every process, whatever
  // order MPI's reduction would take.
  const auto all = all_gather(std::span<const double>(values.data(), values.size()));
  for (std::size_t i = 0; i < values.size(); ++i) {
    double total = 0;
    for (std::size_t r = 0; r < size_; ++r) total += all[r * values.size() + i];
    values[i] = total;
  }
}

std::vector<double> MpiProcessGroup::all_gather(std::span<const double> values) {
  return all_gather_of(values, size_, MPI_DOUBLE);
}

std::vector<std::uint64_t> MpiProcessGroup::all_gather(std::span<const std::uint64_t> values) {
  return all_gather_of(values, size_, MPI_UINT64_T);
}

std::vector<float> MpiProcessGroup::gather_to_root(std::span<const float> values) {
  const auto counts = counts_of_all(values.size(), size_);
  const auto at = displacements_of(counts);
  std::vector<float> all(rank_ == 0 ? static_cast<std::size_t>(at.back()) + static_cast<std::size_t>(counts.back())
                                    : 0);
  check(MPI_Gatherv(values.data(), static_cast<int>(values.size()), MPI_FLOAT, all.data(), counts.data(), at.data(),
                    MPI_FLOAT, 0, MPI_COMM_WORLD),
        "gather");
  return all;
}

std::string MpiProcessGroup::first_error(const std::string& error, std::size_t* failed_rank) {
  // The lowest failing rank, then its message from it to everyone.
  int mine = error.empty() ? INT_MAX : static_cast<int>(rank_);
  int first = INT_MAX;
  check(MPI_Allreduce(&mine, &first, 1, MPI_INT, MPI_MIN, MPI_COMM_WORLD), "all-reduce");
  if (first == INT_MAX) return {};
  if (failed_rank != nullptr) *failed_rank = static_cast<std::size_t>(first);
  const std::string message = error.substr(0, 4096);
  int length = static_cast<int>(message.size());
  check(MPI_Bcast(&length, 1, MPI_INT, first, MPI_COMM_WORLD), "broadcast");
  std::string text(static_cast<std::size_t>(length), '\0');
  if (static_cast<int>(rank_) == first) text = message;
  check(MPI_Bcast(text.data(), length, MPI_CHAR, first, MPI_COMM_WORLD), "broadcast");
  return text;
}

MpiEnvironment::MpiEnvironment(int* argc, char*** argv) {
  int provided = 0;
  MPI_Init_thread(argc, argv, MPI_THREAD_FUNNELED, &provided);
  // Errors come back as codes (check() turns them into loupe::Error) instead of ending the job silently.
  MPI_Comm_set_errhandler(MPI_COMM_WORLD, MPI_ERRORS_RETURN);
}

MpiEnvironment::~MpiEnvironment() {
  int finalized = 0;
  MPI_Finalized(&finalized);
  if (!finalized) MPI_Finalize();
}

void MpiEnvironment::abort_all(int exit_code) {
  MPI_Abort(MPI_COMM_WORLD, exit_code);
  std::exit(exit_code);
}

bool launched_by_mpi() {
  for (const char* name : {"OMPI_COMM_WORLD_SIZE", "PMI_SIZE", "PMIX_RANK", "MPI_LOCALNRANKS"}) {
    if (std::getenv(name) != nullptr) return true;
  }
  return false;
}

}  // namespace loupe
