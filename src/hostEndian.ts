/**
 * Whether this machine stores numbers little-endian, as TIFF "II" files, our outputs and
 * WebAssembly memory do: typed arrays then hold their samples low byte first. Checked once
 * for every module that reads or writes such bytes through typed arrays.
 */
export const LITTLE_ENDIAN_HOST = new Uint8Array(Uint32Array.of(1).buffer)[0] === 1;
