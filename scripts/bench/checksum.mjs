// A fingerprint of a run's returns in episode order: their plain sum and an FNV-1a hash over
// every return's 64 bits and every length (the same as rollout.c computes), so two loops that
// agree here produced the same episodes bit for bit.
const bits = new Float64Array(1);
const words = new Uint32Array(bits.buffer);

export class ReturnsChecksum {
  sum = 0;
  hash = 0x811c9dc5;
  episodes = 0;

  add(returns, lengths) {
    let { sum, hash } = this;
    for (let i = 0; i < returns.length; i++) {
      bits[0] = returns[i];
      sum += returns[i];
      hash = Math.imul(hash ^ words[0], 0x01000193);
      hash = Math.imul(hash ^ words[1], 0x01000193);
      hash = Math.imul(hash ^ lengths[i], 0x01000193);
    }
    this.sum = sum;
    this.hash = hash >>> 0;
    this.episodes += returns.length;
  }
}
