/**
 * The 44-byte header of a canonical PCM WAV file (RIFF, one `fmt ` chunk of 16 bytes, then
 * `data`), as in Microsoft's RIFF/WAVE format for WAVE_FORMAT_PCM. Sizes above 4 GiB are
 * clamped, as RIFF's 32-bit fields cannot hold them. Used where we synthesise masters
 * (tests, the load script); reading is container.ts's job.
 */
export function pcmWavHeader(options: {
  sampleRateHz: number;
  bits: 16 | 24;
  channels: number;
  dataBytes: number;
}): Buffer {
  const { sampleRateHz, bits, channels, dataBytes } = options;
  const blockAlign = channels * (bits / 8);
  const header = Buffer.alloc(44);
  header.write('RIFF', 0, 'latin1');
  header.writeUInt32LE(Math.min(0xffffffff, 36 + dataBytes), 4);
  header.write('WAVE', 8, 'latin1');
  header.write('fmt ', 12, 'latin1');
  header.writeUInt32LE(16, 16);
  header.writeUInt16LE(1, 20);
  header.writeUInt16LE(channels, 22);
  header.writeUInt32LE(sampleRateHz, 24);
  header.writeUInt32LE(sampleRateHz * blockAlign, 28);
  header.writeUInt16LE(blockAlign, 32);
  header.writeUInt16LE(bits, 34);
  header.write('data', 36, 'latin1');
  header.writeUInt32LE(Math.min(0xffffffff, dataBytes), 40);
  return header;
}
