// A fictional season in progress, made once at start-up through the app's own API (so its
// drawings go through the real pipeline, its mail through the outbox and its steps into the
// history). Every drawing is generated here from plain shapes; no real logo or name is used.
import sharp from 'sharp'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../server/db/demo'

type Who = keyof typeof DEMO_ACCOUNTS | 'juniper' | 'tomasz'
const EXTRA: Record<'juniper' | 'tomasz', string> = { juniper: 'juniper@harbourline.example', tomasz: 'tomasz@harbourline.example' }

/** A signed-in person talking to the app, keeping the session cookie as a browser does. */
class Person {
  private cookies = new Map<string, string>()
  constructor(private readonly baseUrl: string, readonly email: string) {}

  async send<T>(method: string, path: string, body?: unknown): Promise<T> {
    const headers: Record<string, string> = { accept: 'application/json' }
    if (this.cookies.size) headers.cookie = [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
    let payload: BodyInit | undefined
    if (body instanceof FormData) payload = body
    else if (body !== undefined) {
      payload = JSON.stringify(body)
      headers['content-type'] = 'application/json'
    }
    const r = await fetch(new URL(path, this.baseUrl), { method, headers, body: payload })
    for (const c of r.headers.getSetCookie()) {
      const [pair] = c.split(';')
      const i = pair!.indexOf('=')
      this.cookies.set(pair!.slice(0, i), pair!.slice(i + 1))
    }
    const text = await r.text()
    if (!r.ok) throw new Error(`${method} ${path} as ${this.email} answered ${r.status}: ${text.slice(0, 300)}`)
    return (text ? JSON.parse(text) : null) as T
  }

  post<T>(path: string, body: unknown = {}) { return this.send<T>('POST', path, body) }
  get<T>(path: string) { return this.send<T>('GET', path) }
}

// ---------- drawings, as a student would scan them: dark marker on off-white paper ----------

const PAPER = '#f3efe4'
const INK = '#1d1c1a'

function star(cx: number, cy: number, r: number, points = 5, inner = 0.45): string {
  const pts: string[] = []
  for (let i = 0; i < points * 2; i++) {
    const a = -Math.PI / 2 + (i * Math.PI) / points
    const rr = i % 2 ? r * inner : r
    pts.push(`${(cx + rr * Math.cos(a)).toFixed(1)},${(cy + rr * Math.sin(a)).toFixed(1)}`)
  }
  return `<polygon points="${pts.join(' ')}"/>`
}

function gear(cx: number, cy: number, r: number, teeth: number): string {
  const pts: string[] = []
  for (let i = 0; i < teeth * 4; i++) {
    const a = (i * Math.PI) / (teeth * 2)
    const rr = i % 4 < 2 ? r : r * 0.84
    pts.push(`${(cx + rr * Math.cos(a)).toFixed(1)},${(cy + rr * Math.sin(a)).toFixed(1)}`)
  }
  return `<polygon points="${pts.join(' ')}"/><circle cx="${cx}" cy="${cy}" r="${r * 0.36}" fill="${PAPER}"/>`
}

/** Each drawing: its shapes on a 1600 × 1100 sheet. */
const DRAWINGS = {
  crest: `<path d="M500 180 H1100 V560 Q1100 860 800 960 Q500 860 500 560 Z"/>
    <path d="M580 260 H1020 V550 Q1020 790 800 875 Q580 790 580 550 Z" fill="${PAPER}"/>
    <path d="M640 600 Q720 420 800 520 Q880 380 960 600 Q880 560 800 640 Q720 560 640 600 Z"/>
    ${star(800, 380, 70)}`,
  gear: `${gear(800, 560, 380, 12)}<rect x="770" y="300" width="60" height="520" fill="${INK}"/>`,
  wave: `<path d="M180 620 Q420 380 660 620 T1140 620 T1420 560 V700 Q1180 820 940 700 T460 700 T180 740 Z"/>
    <circle cx="1280" cy="380" r="90"/>`,
  anchor: `<circle cx="800" cy="260" r="90"/><circle cx="800" cy="260" r="45" fill="${PAPER}"/>
    <rect x="770" y="340" width="60" height="560"/><rect x="620" y="420" width="360" height="50"/>
    <path d="M480 640 Q520 960 800 960 Q1080 960 1120 640 L1050 660 Q1020 880 800 890 Q580 880 550 660 Z"/>`,
  shield: `<path d="M460 200 L800 120 L1140 200 Q1160 700 800 980 Q440 700 460 200 Z"/>
    <path d="M540 260 L800 200 L1060 260 Q1070 660 800 890 Q530 660 540 260 Z" fill="${PAPER}"/>
    ${gear(800, 520, 170, 10)}`,
  sketch: `${star(560, 520, 220, 6, 0.55)}<rect x="900" y="340" width="420" height="70" rx="35"/>
    <rect x="900" y="500" width="300" height="70" rx="35"/><rect x="900" y="660" width="360" height="70" rx="35"/>`,
} as const

async function scan(name: keyof typeof DRAWINGS): Promise<Blob> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="1600" height="1100">
  <rect width="100%" height="100%" fill="${PAPER}"/><g fill="${INK}">${DRAWINGS[name]}</g></svg>`
  const png = await sharp(Buffer.from(svg)).png().toBuffer()
  return new Blob([png], { type: 'image/png' })
}

// ---------- the season ----------

interface Created { artwork: { id: number }; revision: { id: number } }
interface Named { id: number; name: string }
interface Placement { id: number; jobs: { id: number }[] }

/**
 * Loads the season through the app at `baseUrl`: artworks in every state, robots with decals
 * placed, jobs queued, cut and applied, a reprint, spares on the shelf, mail and history.
 * `progress` is told each step as it starts.
 */
export async function loadDemoSeason(baseUrl: string, progress: (step: string, done: number, total: number) => void): Promise<void> {
  const people = {} as Record<Who, Person>
  for (const [who, a] of Object.entries(DEMO_ACCOUNTS)) people[who as Who] = new Person(baseUrl, a.email)
  for (const [who, email] of Object.entries(EXTRA)) people[who as Who] = new Person(baseUrl, email)
  const steps: [string, () => Promise<void>][] = []
  const step = (what: string, run: () => Promise<void>) => steps.push([what, run])

  step('signing the demo people in', async () => {
    for (const p of Object.values(people)) await p.post('/api/auth/sign-in', { email: p.email, password: DEMO_PASSWORD })
  })
  const teams: Record<string, number> = {}
  const films: Record<string, number> = {}
  step('reading the teams and films', async () => {
    for (const t of await people.mentor.get<Named[]>('/api/teams')) teams[t.name] = t.id
    for (const f of await people.mentor.get<Named[]>('/api/films')) films[f.name] = f.id
  })

  const art: Record<string, Created> = {}
  const upload = (who: Who, key: keyof typeof DRAWINGS, title: string, team: string, widthMm: number) =>
    step(`outlining “${title}”`, async () => {
      const body = new FormData()
      body.set('file', await scan(key), `${key}-scan.png`)
      body.set('title', title)
      body.set('teamId', String(teams[team]))
      body.set('widthMm', String(widthMm))
      art[key] = await people[who].post<Created>('/api/artworks', body)
    })
  upload('student', 'crest', 'Wren crest', 'Copper Wrens', 90)
  upload('designer', 'gear', 'Gear badge', 'Copper Wrens', 60)
  upload('student', 'wave', 'Tide stripe', 'Copper Wrens', 180)
  upload('student', 'sketch', 'Pit banner sketch', 'Copper Wrens', 120)
  upload('juniper', 'shield', 'Sprocket shield', 'Tidewater Sprockets', 80)
  upload('tomasz', 'anchor', 'Anchor mark', 'Tidewater Sprockets', 70)

  const submit = (who: Who, key: keyof typeof DRAWINGS) => people[who].post(`/api/revisions/${art[key]!.revision.id}/submit`)
  const review = (key: keyof typeof DRAWINGS, decision: 'approve' | 'send-back', comment = '') =>
    people.mentor.post(`/api/revisions/${art[key]!.revision.id}/review`, { decision, comment })
  step('submitting and reviewing', async () => {
    await submit('student', 'crest')
    await review('crest', 'approve', 'Clean outline; the star reads well from across the pit.')
    await submit('juniper', 'shield')
    await review('shield', 'approve')
    await submit('student', 'wave')
    await review('wave', 'send-back', 'The little sun sits too close to the wave: leave a 3 mm gap so the film between them survives weeding.')
    await submit('designer', 'gear')
    await submit('tomasz', 'anchor')
  })

  const robots: Record<string, number> = {}
  step('building the robots', async () => {
    robots.kestrel = (await people.mentor.post<Named>('/api/robots', { teamId: teams['Copper Wrens'], name: 'Kestrel', season: '2026–27' })).id
    robots.undertow = (await people.mentor.post<Named>('/api/robots', { teamId: teams['Tidewater Sprockets'], name: 'Undertow', season: '2026–27' })).id
  })

  const black = () => films['Matte black polyester film']!
  let crestPlacement: Placement | undefined
  step('placing decals and cutting them', async () => {
    crestPlacement = await people.mentor.post<Placement>('/api/placements', {
      robotId: robots.kestrel, revisionId: art.crest!.revision.id, filmId: black(), spot: 'left side panel', widthMm: 90, quantity: 2, spares: 2,
    })
    const crestJob = crestPlacement.jobs[0]!.id
    await people.operator.post(`/api/jobs/${crestJob}/state`, { state: 'cut' })
    await people.operator.post(`/api/jobs/${crestJob}/state`, { state: 'applied', applied: 2 })
    // Queued and waiting for the operator.
    await people.mentor.post<Placement>('/api/placements', {
      robotId: robots.undertow, revisionId: art.shield!.revision.id, filmId: black(), spot: 'front bumper', widthMm: 80, quantity: 2, spares: 1,
    })
  })
  step('using a spare and asking for a reprint', async () => {
    const reason = 'Scraped off against the field wall in the second match.'
    await people.student.post(`/api/placements/${crestPlacement!.id}/spares`, { count: 1, reason })
    await people.student.post(`/api/placements/${crestPlacement!.id}/reprints`, { quantity: 1, reason: `${reason} One spare went on; this restores the shelf.` })
  })

  for (const [i, [what, run]] of steps.entries()) {
    progress(what, i, steps.length)
    await run()
  }
  progress('done', steps.length, steps.length)
}
