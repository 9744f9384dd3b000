#pragma once
// Helpers of the two pair searches (CatalogMerge.cpp, Systems.cpp): the per-worker result lists joined
// into one, and the root of a union-find forest.
#include <cstdint>
#include <vector>

namespace starcensus::census::detail {

/// The per-worker lists in worker order, in one list.
template <class T>
std::vector<T> joinParts(std::vector<std::vector<T>>& parts) {
    std::vector<T> joined;
    for (auto& part : parts) {
        joined.insert(joined.end(), part.begin(), part.end());
    }
    return joined;
}

/// The root of i in the union-find forest `parent` (parent[root] == root), halving the path on the way.
inline std::uint32_t findRoot(std::vector<std::uint32_t>& parent, std::uint32_t i) {
    while (parent[i] != i) {
        parent[i] = parent[parent[i]];
        i = parent[i];
    }
    return i;
}

} // namespace starcensus::census::detail
