#include "analysis/group_tests.h"

#include "analysis/distinctive_topics.h"
#include "analysis/permanova.h"
#include "analysis/profile_distance.h"

namespace loupe {

GroupTestResults run_group_tests(const GroupedDocuments& data, const GroupTestOptions& options, int chain) {
  const IncludedDocuments documents = select_documents(data, "comparing groups");
  GroupTestResults results;
  results.chain = chain;
  ProfileOptions profile_options;
  profile_options.bootstrap_replicates = options.bootstrap_replicates;
  profile_options.seed = options.permutation.seed;
  profile_options.weight_by_length = options.weight_by_length;
  profile_options.level = options.level;
  profile_options.threads = options.permutation.threads;
  results.profiles = group_profiles(documents, profile_options);
  results.profiles.chain = chain;

  auto permanova_result = permanova(documents, options.permutation, "PERMANOVA", "all groups");
  const auto permdisp_result = permdisp(documents, options.permutation, options.dispersion_warning_level);
  permanova_result.record.warning = dispersion_warning(permdisp_result);
  results.mean_distance_to_centroid = permdisp_result.mean_distance_to_centroid;
  results.records.push_back(permanova_result.record);
  results.records.push_back(permdisp_result.record);

  if (documents.size() <= options.anosim_max_documents) {
    results.records.push_back(anosim(documents, options.permutation, options.anosim_max_documents).record);
  } else {
    TestRecord skipped;
    skipped.method = "ANOSIM";
    skipped.statistic_name = "R";
    skipped.comparison = "all groups";
    skipped.sample_size = documents.size();
    skipped.num_groups = documents.num_groups();
    skipped.effect_size_name = "R";
    skipped.strata = documents.strata_name;
    skipped.seed = options.permutation.seed;
    skipped.warning = "not run: " + std::to_string(documents.size()) + " documents exceed the ANOSIM limit of " +
                      std::to_string(options.anosim_max_documents) + "; raise the limit to run it";
    results.records.push_back(skipped);
  }
  if (documents.num_groups() > 2) {
    for (auto& r : pairwise_permanova(documents, options.permutation, options.pairwise_adjustment)) {
      results.records.push_back(std::move(r.record));
    }
  }
  for (auto& r : profile_distances(documents, options.permutation, options.weight_by_length)) {
    results.records.push_back(std::move(r));
  }
  DistinctiveTopicOptions distinctive;
  distinctive.permutation = options.permutation;
  distinctive.bootstrap_replicates = options.bootstrap_replicates;
  distinctive.weight_by_length = options.weight_by_length;
  distinctive.level = options.level;
  for (auto& r : distinctive_topics(documents, distinctive)) results.records.push_back(std::move(r));
  for (auto& r : results.records) r.chain = chain;
  return results;
}

}  // namespace loupe
