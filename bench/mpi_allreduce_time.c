/* Seconds one MPI_Allreduce of a table of uint32 counts takes, as loupe's
 * SharedCountMerger sums the V x K topic-word table after every sweep, for
 * tables of 1.6 MB (V = 20,000, K = 20), 8 MB (K = 100) and 80 MB (K = 1000).
 * Built and run by bench/mpi_scaling.sh; not part of loupe. */
#include <mpi.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>

int main(int argc, char** argv) {
  MPI_Init(&argc, &argv);
  int rank = 0, size = 1;
  MPI_Comm_rank(MPI_COMM_WORLD, &rank);
  MPI_Comm_size(MPI_COMM_WORLD, &size);
  const size_t counts[] = {400000, 2000000, 20000000};
  for (int i = 0; i < 3; ++i) {
    const size_t n = counts[i];
    uint32_t* table = calloc(n, sizeof(uint32_t));
    MPI_Allreduce(MPI_IN_PLACE, table, (int)n, MPI_UINT32_T, MPI_SUM, MPI_COMM_WORLD);
    const int repeats = 10;
    double seconds = MPI_Wtime();
    for (int r = 0; r < repeats; ++r) MPI_Allreduce(MPI_IN_PLACE, table, (int)n, MPI_UINT32_T, MPI_SUM, MPI_COMM_WORLD);
    seconds = (MPI_Wtime() - seconds) / repeats;
    if (rank == 0) printf("allreduce,%d,%.1f MB,%.4f s\n", size, (double)(n * sizeof(uint32_t)) / 1e6, seconds);
    free(table);
  }
  MPI_Finalize();
  return 0;
}
