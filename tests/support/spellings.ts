// Spellings a person may type for one name: case, spaces, hyphens, run together, brackets,
// and the name inside a longer description.
export function spellings(name: string): string[] {
  const words = name.replace(/[()]/g, ' ').split(/[\s-]+/).filter(Boolean)
  return [...new Set([
    name, name.toUpperCase(), name.toLowerCase(),
    words.join(' '), words.join('-'), words.join(''),
    words.map((w) => w[0]!.toUpperCase() + w.slice(1)).join(' '),
    `  ${words.join('  ')}  `,
    `${name} film`, `White ${name.toLowerCase()} with acrylic adhesive`,
  ])]
}
