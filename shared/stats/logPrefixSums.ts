/**
 * ln of the running sums of counts[i] * exp(logWeights[i]): entry i is ln sum_{j <= i}. Kept in logs
 * so that weights far below the largest keep their digits (the networks of Fisher's test add them up
 * as prefixes of sorted partial tables).
 *
 * @example
 * logPrefixSums([0, Math.log(2)], [1, 3]) // => [ln 1, ln 7]
 */
export function logPrefixSums(logWeights: ArrayLike<number>, counts: ArrayLike<number>): Float64Array {
  const logPrefix = new Float64Array(logWeights.length);
  let running = -Infinity;
  for (let i = 0; i < logWeights.length; i++) {
    const term = Math.log(counts[i]) + logWeights[i];
    running = running === -Infinity ? term : Math.max(running, term) + Math.log1p(Math.exp(-Math.abs(running - term)));
    logPrefix[i] = running;
  }
  return logPrefix;
}
