// share_of and run_together (common/process_group.h), with processes simulated by threads.
#include <gtest/gtest.h>

#include "common/process_group.h"
#include "support/thread_process_group.h"

namespace loupe {
namespace {

TEST(ShareOf, SplitsIntoContiguousRangesThatDifferByAtMostOne) {
  // The example of the header: 10 items over 3 processes.
  EXPECT_EQ(share_of(10, 0, 3).begin, 0U);
  EXPECT_EQ(share_of(10, 0, 3).end, 4U);
  EXPECT_EQ(share_of(10, 1, 3).begin, 4U);
  EXPECT_EQ(share_of(10, 1, 3).end, 7U);
  EXPECT_EQ(share_of(10, 2, 3).begin, 7U);
  EXPECT_EQ(share_of(10, 2, 3).end, 10U);
  // More processes than items: the last ones get nothing.
  EXPECT_EQ(share_of(2, 3, 4).begin, share_of(2, 3, 4).end);
}

TEST(RunTogether, AnErrorOnOneProcessStopsEveryProcessWithItsMessage) {
  std::vector<std::string> messages(3);
  testing::run_as_processes(3, [&](ProcessGroup& group) {
    try {
      run_together(group, [&] {
        if (group.rank() == 1) throw Error("share.corpus: no such file. Check the path.");
      });
    } catch (const CollectiveError& e) {
      messages[group.rank()] = e.what();
    }
  });
  EXPECT_EQ(messages[0], "process 2 of 3 stopped: share.corpus: no such file. Check the path.");
  EXPECT_EQ(messages[1], "share.corpus: no such file. Check the path.");
  EXPECT_EQ(messages[2], "process 2 of 3 stopped: share.corpus: no such file. Check the path.");
}

TEST(RunTogether, NoErrorNoThrow) {
  testing::run_as_processes(2, [](ProcessGroup& group) { EXPECT_NO_THROW(run_together(group, [] {})); });
}

}  // namespace
}  // namespace loupe
