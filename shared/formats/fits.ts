/**
 * A small reader of FITS files (FITS Standard 4.0, IAU FITS Working Group 2016): headers, 1-D/n-D
 * images and binary tables, which is what 1-D spectra and catalogue tables come as. No npm package
 * for FITS is maintained (the two on the registry were last published years ago and are browser
 * bound), and the part needed here is small. Works on a Uint8Array, in Node and in the browser.
 *
 * Not read: ASCII tables (XTENSION = 'TABLE'), random groups, compressed images (tile compression),
 * variable-length array columns (P/Q) and complex columns — each refused by name when asked for.
 */

export type FitsValue = string | number | boolean | null

export class FitsError extends Error {
  constructor(message: string, readonly hdu?: number) {
    super(hdu === undefined ? message : `HDU ${hdu}: ${message}`)
    this.name = 'FitsError'
  }
}

export type HduKind = 'image' | 'bintable' | 'table' | 'other'

export interface FitsHdu {
  /** 0 for the primary HDU. */
  index: number
  kind: HduKind
  /** Keywords in file order; HIERARCH keywords without the word HIERARCH; COMMENT/HISTORY left out. */
  header: Map<string, FitsValue>
  /** Byte offset of the data unit and its length without the padding. */
  dataOffset: number
  dataLength: number
}

const BLOCK = 2880
const CARD = 80

/** Every HDU of the file, headers parsed and data located (data is read on demand). */
export function readFits(bytes: Uint8Array): FitsHdu[] {
  const hdus: FitsHdu[] = []
  let offset = 0
  while (offset < bytes.length) {
    // trailing bytes after the last HDU that are not a header (some writers pad with zeros) end the file
    if (hdus.length > 0 && !startsWithXtension(bytes, offset)) break
    const index = hdus.length
    const { header, end } = readHeader(bytes, offset, index)
    if (index === 0 && header.get('SIMPLE') !== true) throw new FitsError('not a FITS file (the first card must be SIMPLE = T)', 0)
    const dataOffset = end
    const dataLength = dataSize(header, index)
    if (dataOffset + dataLength > bytes.length) {
      throw new FitsError(`the file ends inside the data unit (${dataOffset + dataLength - bytes.length} bytes missing)`, index)
    }
    hdus.push({ index, kind: kindOf(header, index), header, dataOffset, dataLength })
    offset = dataOffset + Math.ceil(dataLength / BLOCK) * BLOCK
  }
  if (hdus.length === 0) throw new FitsError('empty file')
  return hdus
}

function startsWithXtension(bytes: Uint8Array, offset: number): boolean {
  return offset + CARD <= bytes.length && ascii(bytes, offset, 8) === 'XTENSION'
}

function ascii(bytes: Uint8Array, start: number, length: number): string {
  let s = ''
  for (let i = start; i < start + length; i++) s += String.fromCharCode(bytes[i]!)
  return s
}

function kindOf(header: Map<string, FitsValue>, index: number): HduKind {
  if (index === 0) return 'image'
  const x = String(header.get('XTENSION') ?? '').trim().toUpperCase()
  if (x === 'IMAGE') return 'image'
  if (x === 'BINTABLE') return header.get('ZIMAGE') === true ? 'other' : 'bintable'
  if (x === 'TABLE') return 'table'
  return 'other'
}

function readHeader(bytes: Uint8Array, start: number, index: number): { header: Map<string, FitsValue>; end: number } {
  const header = new Map<string, FitsValue>()
  let pendingString: string | null = null, pendingKey = ''
  for (let at = start; ; at += CARD) {
    if (at + CARD > bytes.length) throw new FitsError('the header has no END card', index)
    for (let i = at; i < at + CARD; i++) {
      const c = bytes[i]!
      if (c < 0x20 || c > 0x7e) throw new FitsError(`the header holds a byte that is not printable ASCII at offset ${i}`, index)
    }
    const card = ascii(bytes, at, CARD)
    const key = card.slice(0, 8).trimEnd()
    if (key === 'END') return { header, end: start + Math.ceil((at + CARD - start) / BLOCK) * BLOCK }
    if (key === 'CONTINUE' && pendingString !== null) {
      const part = parseValue(card.slice(8), index)
      if (typeof part === 'string') {
        pendingString = pendingString.slice(0, -1) + part
        header.set(pendingKey, pendingString.endsWith('&') ? pendingString.slice(0, -1) : pendingString)
        if (!pendingString.endsWith('&')) pendingString = null
        continue
      }
    }
    pendingString = null
    if (key === 'HIERARCH') {
      const eq = card.indexOf('=')
      if (eq < 0) continue
      header.set(card.slice(9, eq).trim(), parseValue(card.slice(eq + 1), index))
      continue
    }
    if (key === '' || key === 'COMMENT' || key === 'HISTORY' || card.slice(8, 10) !== '= ') continue
    const value = parseValue(card.slice(10), index)
    header.set(key, value)
    if (typeof value === 'string' && value.endsWith('&')) {
      pendingString = value
      pendingKey = key
      header.set(key, value.slice(0, -1))
    }
  }
}

/** A value field (after "= "): a quoted string ('' is a quote), T/F, an integer or a real (E or D exponent). */
function parseValue(field: string, index: number): FitsValue {
  const s = field.trimStart()
  if (s.startsWith("'")) {
    let out = ''
    for (let i = 1; i < s.length; i++) {
      if (s[i] === "'") {
        if (s[i + 1] === "'") { out += "'"; i++; continue }
        return out.trimEnd()
      }
      out += s[i]
    }
    throw new FitsError(`a string value has no closing quote: ${field.trim()}`, index)
  }
  const token = s.split('/')[0]!.trim()
  if (token === '') return null
  if (token === 'T') return true
  if (token === 'F') return false
  const n = Number(token.replace(/[dD]/, 'E'))
  return Number.isFinite(n) ? n : token
}

function intKey(header: Map<string, FitsValue>, key: string, index: number, fallback?: number): number {
  const v = header.get(key)
  if (v === undefined && fallback !== undefined) return fallback
  if (typeof v !== 'number' || !Number.isInteger(v)) throw new FitsError(`${key} must be an integer`, index)
  return v
}

function numberKey(header: Map<string, FitsValue>, key: string, fallback: number): number {
  const v = header.get(key)
  return typeof v === 'number' ? v : fallback
}

/** Length of the data unit in bytes (FITS 4.0 eq. 1 and 2). */
function dataSize(header: Map<string, FitsValue>, index: number): number {
  const bitpix = intKey(header, 'BITPIX', index)
  if (![8, 16, 32, 64, -32, -64].includes(bitpix)) throw new FitsError(`BITPIX = ${bitpix} is not allowed`, index)
  const naxis = intKey(header, 'NAXIS', index)
  if (naxis < 0 || naxis > 999) throw new FitsError(`NAXIS = ${naxis} is not allowed`, index)
  if (naxis === 0) return 0
  let product = 1
  for (let k = 1; k <= naxis; k++) {
    const n = intKey(header, `NAXIS${k}`, index)
    if (n < 0) throw new FitsError(`NAXIS${k} is negative`, index)
    product *= n
  }
  const pcount = intKey(header, 'PCOUNT', index, 0), gcount = intKey(header, 'GCOUNT', index, 1)
  return (Math.abs(bitpix) / 8) * gcount * (pcount + product)
}

export interface FitsImage {
  /** NAXIS1, NAXIS2, … (NAXIS1 varies fastest). */
  shape: number[]
  /** Physical values: BZERO + BSCALE × stored; BLANK and IEEE NaN pixels are NaN. */
  data: Float64Array
}

/** The pixels of an image HDU. */
export function readImage(bytes: Uint8Array, hdu: FitsHdu): FitsImage {
  if (hdu.kind !== 'image') throw new FitsError('not an image', hdu.index)
  const h = hdu.header
  const bitpix = intKey(h, 'BITPIX', hdu.index), naxis = intKey(h, 'NAXIS', hdu.index)
  const shape = Array.from({ length: naxis }, (_, k) => intKey(h, `NAXIS${k + 1}`, hdu.index))
  const count = naxis === 0 ? 0 : shape.reduce((a, b) => a * b, 1)
  const bscale = numberKey(h, 'BSCALE', 1), bzero = numberKey(h, 'BZERO', 0)
  const blank = h.get('BLANK')
  const view = new DataView(bytes.buffer, bytes.byteOffset + hdu.dataOffset, hdu.dataLength)
  const read = reader(bitpix)
  const width = Math.abs(bitpix) / 8
  const data = new Float64Array(count)
  for (let i = 0; i < count; i++) {
    const raw = read(view, i * width)
    data[i] = bitpix > 0 && typeof blank === 'number' && raw === blank ? NaN : bzero + bscale * raw
  }
  return { shape, data }
}

function reader(bitpix: number): (view: DataView, at: number) => number {
  switch (bitpix) {
    case 8: return (v, at) => v.getUint8(at)
    case 16: return (v, at) => v.getInt16(at, false)
    case 32: return (v, at) => v.getInt32(at, false)
    case 64: return (v, at) => Number(v.getBigInt64(at, false))
    case -32: return (v, at) => v.getFloat32(at, false)
    default: return (v, at) => v.getFloat64(at, false)
  }
}

export interface FitsColumnInfo {
  /** 1-based column number n of TTYPEn. */
  number: number
  name: string
  unit: string | undefined
  /** The data type letter of TFORMn and its repeat count. */
  type: string
  repeat: number
}

const TYPE_WIDTH: Record<string, number> = { L: 1, X: 1, B: 1, I: 2, J: 4, K: 8, A: 1, E: 4, D: 8, C: 8, M: 16, P: 8, Q: 16 }

/** The columns of a binary table as its header declares them (FITS 4.0 §7.3). */
export function tableColumns(hdu: FitsHdu): FitsColumnInfo[] {
  if (hdu.kind !== 'bintable') throw new FitsError('not a binary table', hdu.index)
  const h = hdu.header
  const fields = intKey(h, 'TFIELDS', hdu.index)
  const out: FitsColumnInfo[] = []
  for (let n = 1; n <= fields; n++) {
    const form = String(h.get(`TFORM${n}`) ?? '').trim().toUpperCase()
    const m = /^(\d*)([LXBIJKAEDCMPQ])/.exec(form)
    if (!m) throw new FitsError(`TFORM${n} = '${form}' is not a binary-table format`, hdu.index)
    const unit = h.get(`TUNIT${n}`)
    out.push({
      number: n, name: String(h.get(`TTYPE${n}`) ?? `COL${n}`).trim(), unit: typeof unit === 'string' && unit.trim() ? unit.trim() : undefined,
      type: m[2]!, repeat: m[1] === '' ? 1 : Number(m[1]),
    })
  }
  const width = out.reduce((sum, c) => sum + byteWidth(c), 0)
  if (width !== intKey(h, 'NAXIS1', hdu.index)) throw new FitsError(`the columns take ${width} bytes a row but NAXIS1 says ${intKey(h, 'NAXIS1', hdu.index)}`, hdu.index)
  return out
}

function byteWidth(c: FitsColumnInfo): number {
  return c.type === 'X' ? Math.ceil(c.repeat / 8) : c.repeat * TYPE_WIDTH[c.type]!
}

/**
 * One numeric column of a binary table, row after row (rows × repeat values), as physical values
 * TZEROn + TSCALn × stored; TNULLn integers and IEEE NaN are NaN; logicals read 1/0 (undefined: NaN).
 */
export function readTableColumn(bytes: Uint8Array, hdu: FitsHdu, column: FitsColumnInfo): Float64Array {
  const columns = tableColumns(hdu)
  if (!['L', 'B', 'I', 'J', 'K', 'E', 'D'].includes(column.type)) {
    const what = column.type === 'A' ? 'text' : column.type === 'P' || column.type === 'Q' ? 'a variable-length array' : `type ${column.type}`
    throw new FitsError(`column ${column.name} holds ${what}, not numbers`, hdu.index)
  }
  const h = hdu.header
  const rows = intKey(h, 'NAXIS2', hdu.index), rowBytes = intKey(h, 'NAXIS1', hdu.index)
  let start = 0
  for (const c of columns) {
    if (c.number === column.number) break
    start += byteWidth(c)
  }
  const width = TYPE_WIDTH[column.type]!
  const scale = numberKey(h, `TSCAL${column.number}`, 1), zero = numberKey(h, `TZERO${column.number}`, 0)
  const nul = h.get(`TNULL${column.number}`)
  const view = new DataView(bytes.buffer, bytes.byteOffset + hdu.dataOffset, hdu.dataLength)
  const read = column.type === 'L'
    ? (v: DataView, at: number) => { const c = v.getUint8(at); return c === 0x54 ? 1 : c === 0x46 ? 0 : NaN }
    : reader({ B: 8, I: 16, J: 32, K: 64, E: -32, D: -64 }[column.type]!)
  const integer = 'BIJK'.includes(column.type)
  const out = new Float64Array(rows * column.repeat)
  for (let r = 0; r < rows; r++) {
    for (let k = 0; k < column.repeat; k++) {
      const raw = read(view, r * rowBytes + start + k * width)
      out[r * column.repeat + k] = integer && typeof nul === 'number' && raw === nul ? NaN : column.type === 'L' ? raw : zero + scale * raw
    }
  }
  return out
}

/** One text column (TFORMn = rA) of a binary table: one trimmed string per row. */
export function readTextColumn(bytes: Uint8Array, hdu: FitsHdu, column: FitsColumnInfo): string[] {
  if (column.type !== 'A') throw new FitsError(`column ${column.name} is not text`, hdu.index)
  const columns = tableColumns(hdu)
  let start = 0
  for (const c of columns) {
    if (c.number === column.number) break
    start += byteWidth(c)
  }
  const rows = intKey(hdu.header, 'NAXIS2', hdu.index), rowBytes = intKey(hdu.header, 'NAXIS1', hdu.index)
  const out: string[] = []
  for (let r = 0; r < rows; r++) {
    const at = hdu.dataOffset + r * rowBytes + start
    let s = ''
    for (let i = 0; i < column.repeat; i++) {
      const c = bytes[at + i]!
      if (c === 0) break
      s += String.fromCharCode(c)
    }
    out.push(s.trimEnd())
  }
  return out
}
