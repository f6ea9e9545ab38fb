// Cross-check of unitgram's allocator against two npm packages we did not
// write: hare-niemeyer@3.0.0 (largest remainder with the Hare quota) and
// sainte-lague@3.0.0 (highest averages, divisors 1, 3, 5, ...).
//
//   node alloc_crosscheck.mjs PATH/TO/alloc_driver
//
// Random cases come from a fixed seed (splitmix64), so every run checks the
// same cases. Both packages compute in binary floating point, and both have
// known defects on ties (ENVIRONMENT.md): hare-niemeyer can leave seats
// unallocated on exact ties and compares remainders as strings (one below
// 1e-6 prints in exponent form and outranks 0.5); sainte-lague throws on a
// tie at the cut. So a case is kept only when the reference can be trusted
// on it, decided here with exact BigInt arithmetic:
//   - largest remainder: every remainder lies in (1e-6, 1 - 1e-6) and any
//     two differ by more than 1e-9, so float noise cannot reorder them;
//   - Sainte-Laguë: the last quotient that wins a seat beats the first that
//     does not by more than 1e-9 (relative and absolute): no tie at the cut.
// These are exactly the cases where nothing but the method decides the
// answer; our exact arithmetic must be right on them on its own. Ties, where
// our stated rule decides instead, are tested in tests/check_alloc.c.
//
// Prints each disagreement and a last line "N passed, N failed"; exits 1 on
// any disagreement or when too few trusted cases were generated.
import { spawnSync } from 'node:child_process'
import hareNiemeyer from 'hare-niemeyer'
import sainteLague from 'sainte-lague'

const CASES_PER_METHOD = 5000
const SCALE = 1000000n // counts carry up to six decimal places

// ---- splitmix64 (Steele, Lea & Flood, OOPSLA 2014) -------------------------
const MASK = (1n << 64n) - 1n
let state = 20260317n
function next() {
	state = (state + 0x9e3779b97f4a7c15n) & MASK
	let z = state
	z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK
	z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK
	return z ^ (z >> 31n)
}
const below = n => Number(next() % BigInt(n)) // n < 2^53
const belowBig = n => next() % n

// ---- random inputs ---------------------------------------------------------
// A count as scaled BigInt in one of several shapes: small integers, larger
// integers, and decimals with one to six places.
function randomCount(shape) {
	switch (shape) {
		case 0: return BigInt(1 + below(50)) * SCALE
		case 1: return BigInt(1 + below(1000000)) * SCALE
		case 2: return BigInt(1 + below(1000000000)) * SCALE
		case 3: return BigInt(1 + below(100000)) * 100000n // tenths up to 10^4
		default: return 1000n + belowBig(1000n * SCALE) // six places up to 1000
	}
}

function text(v) {
	const whole = v / SCALE
	const frac = (v % SCALE).toString().padStart(6, '0').replace(/0+$/, '')
	return frac ? `${whole}.${frac}` : `${whole}`
}

function randomInput(allowZero) {
	const shape = below(5)
	const n = 1 + below(below(5) === 0 ? 40 : 8)
	const counts = []
	for (let i = 0; i < n; i++) {
		counts.push(allowZero && below(12) === 0 ? 0n : randomCount(shape))
	}
	const seats = 1 + below(below(4) === 0 ? 500 : 60)
	return { counts, seats }
}

// ---- trust filters (exact) -------------------------------------------------
const sum = xs => xs.reduce((a, b) => a + b, 0n)

function hareTrusted({ counts, seats }) {
	const total = sum(counts)
	if (total === 0n) return false
	const rems = counts.map(v => (v * BigInt(seats)) % total).sort((a, b) => (a < b ? -1 : a > b ? 1 : 0))
	for (const r of rems) {
		// 1e-6 < r / total < 1 - 1e-6
		if (r * 1000000n <= total || (total - r) * 1000000n <= total) return false
	}
	for (let i = 1; i < rems.length; i++) {
		if ((rems[i] - rems[i - 1]) * 1000000000n <= total) return false
	}
	return true
}

// Quotient v / (2k + 1) as a fraction; compare a/b with c/d (b, d > 0).
const cmp = (a, b) => {
	const l = a.num * b.den, r = b.num * a.den
	return l < r ? -1 : l > r ? 1 : 0
}

// The seats+1 largest quotients, found one at a time as the method awards
// them; only the last winner and the first loser matter.
function sainteLagueTrusted({ counts, seats }) {
	if (sum(counts) === 0n) return false
	const given = counts.map(() => 0n)
	const quotient = i => ({ num: counts[i], den: (2n * given[i] + 1n) * SCALE })
	let last = null, first = null
	for (let k = 0; k <= seats; k++) {
		let best = 0
		for (let i = 1; i < counts.length; i++) {
			if (cmp(quotient(i), quotient(best)) > 0) best = i
		}
		if (k < seats) last = quotient(best)
		else first = quotient(best)
		given[best]++
	}
	// gap > 1e-9 * max(1, last): relative and absolute
	const gap = { num: last.num * first.den - first.num * last.den, den: last.den * first.den }
	const one = { num: 1n, den: 1n }
	const scale = cmp(last, one) > 0 ? last : one
	return gap.num * 1000000000n * scale.den > scale.num * gap.den
}

// ---- the references ---------------------------------------------------------
function asVotes(counts) {
	const votes = {}
	counts.forEach((v, i) => { votes[`c${i}`] = Number(text(v)) })
	return votes
}

function reference(method, { counts, seats }) {
	const votes = asVotes(counts)
	const seatsBy = method === 'largest-remainder'
		? hareNiemeyer(votes, seats, false)
		: sainteLague(votes, seats, { draw: false })
	return counts.map((_, i) => seatsBy[`c${i}`])
}

// ---- generate, run, compare ---------------------------------------------------
const methods = [
	{ name: 'largest-remainder', trusted: hareTrusted, allowZero: false },
	{ name: 'sainte-lague', trusted: sainteLagueTrusted, allowZero: true },
]

const driver = process.argv[2]
if (!driver) {
	console.error('usage: node alloc_crosscheck.mjs PATH/TO/alloc_driver')
	process.exit(2)
}

const cases = []
for (const m of methods) {
	let kept = 0, tries = 0
	while (kept < CASES_PER_METHOD && tries < 20 * CASES_PER_METHOD) {
		tries++
		const input = randomInput(m.allowZero)
		if (!m.trusted(input)) continue
		cases.push({ method: m.name, ...input })
		kept++
	}
	console.log(`${m.name}: ${kept} trusted cases of ${tries} generated`)
	if (kept < CASES_PER_METHOD) {
		console.log(`too few trusted cases for ${m.name}`)
		console.log(`0 passed, 1 failed`)
		process.exit(1)
	}
}

const input = cases.map(c => `${c.method} ${c.seats} ${c.counts.map(text).join(' ')}`).join('\n') + '\n'
const run = spawnSync(driver, { input, encoding: 'utf8', maxBuffer: 64 << 20 })
if (run.status !== 0) {
	console.error(`driver failed (status ${run.status}): ${run.stderr}`)
	console.log('0 passed, 1 failed')
	process.exit(1)
}
const ours = run.stdout.trimEnd().split('\n')

let passed = 0, failed = 0
cases.forEach((c, k) => {
	let want
	try {
		want = reference(c.method, c).join(' ')
	} catch (e) {
		want = `reference threw: ${e.message}`
	}
	if (ours[k] === want) {
		passed++
		return
	}
	failed++
	if (failed <= 20) {
		console.log(`DISAGREE ${c.method} seats=${c.seats} counts=${c.counts.map(text).join(' ')}`)
		console.log(`  unitgram:  ${ours[k]}`)
		console.log(`  reference: ${want}`)
	}
})
console.log(`${passed} passed, ${failed} failed`)
process.exit(failed ? 1 : 0)
