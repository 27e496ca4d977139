// Upload limits: a 16-bit 24-megapixel TIFF is ~140 MB uncompressed, so 200 MB leaves room;
// 100 megapixels refuses decompression bombs long before memory is at risk.
// UPLOAD_MAX_MB lowers the byte limit (the test profile uses it to test refusals quickly).
const maxMb = Number(process.env.UPLOAD_MAX_MB) > 0 ? Number(process.env.UPLOAD_MAX_MB) : 200;
export const UPLOAD_LIMITS = { maxBytes: maxMb * 1024 * 1024, maxPixels: 100_000_000 };
