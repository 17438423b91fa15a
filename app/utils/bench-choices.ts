// The clean-up's choices in words, and how the tuning bench overrides or keeps them.
//
// A run reports each choice with the value it used, written exactly as the setting would be
// written to pin it (shared/types/pipeline.ts, CleanUpChoice). Keeping an automatic choice is
// therefore writing that value into the settings; "Automatic" writes 'auto' back.
import type { CleanUpChoice, CleanUpSetting } from '#shared/types/pipeline'
import type { PipelineSettings } from '#shared/utils/settings'
import { thresholdWords } from './bench-settings'

/** The choices in the order a designer meets them, with the name the bench gives each. */
export const CHOICE_LABELS: Record<CleanUpSetting, string> = {
  corners: 'Straightening',
  lightingEvening: 'Lighting evening',
  inkColour: 'Ink read by',
  dropoutColour: 'Colour read as paper',
  paperLines: 'Ruled or grid lines',
  threshold: 'Threshold',
  thickenToMm: 'Thin strokes',
  marginMm: 'Trim and margin',
}

const mm = (v: number) => `${Number(v.toFixed(2))} mm`

/** The value a choice used, in words. */
export function choiceValueWords(c: CleanUpChoice): string {
  switch (c.setting) {
    case 'corners': return c.value.mode === 'manual' ? 'Straightened from four corners' : 'Taken as it is'
    case 'lightingEvening': return c.value.mode === 'on' ? `On, strength ${Math.round(c.value.strength * 100)} %` : 'Off'
    case 'inkColour': return c.value === 'colour' ? 'Colour against the paper' : 'Darkness'
    case 'dropoutColour': return c.value.mode === 'colours' ? c.value.colours.join(' and ') : 'None'
    case 'paperLines': return c.value === 'remove' ? 'Taken out' : 'Kept'
    case 'threshold': return thresholdWords(c.value)
    case 'thickenToMm': return c.value === null ? 'Kept as drawn' : `Thickened to ${mm(c.value)}`
    case 'marginMm': return c.value > 0 ? `${mm(c.value)} of paper around the ink` : 'Trimmed to the ink'
  }
}

/** One entry of a choice's override list: a key for the control, its words, and the setting's value. */
export interface ChoiceOption<K extends OverridableSetting = OverridableSetting> {
  key: string
  label: string
  value: PipelineSettings[K]
}

/** The choices the pipeline can make by itself, each with an 'auto' value. */
export type OverridableSetting = 'corners' | 'lightingEvening' | 'inkColour' | 'dropoutColour' | 'paperLines' | 'threshold'

export const OVERRIDABLE: readonly OverridableSetting[] = ['corners', 'lightingEvening', 'inkColour', 'dropoutColour', 'paperLines', 'threshold']

export function isOverridable(s: CleanUpSetting): s is OverridableSetting {
  return (OVERRIDABLE as readonly string[]).includes(s)
}

/**
 * "Automatic" and the explicit values a designer can set instead. Values that need more than
 * a word (four corners, a colour to drop, a threshold method) are offered as the run found
 * them, when it found them, and otherwise as a sensible start.
 */
export function choiceOptions(setting: OverridableSetting, settings: PipelineSettings, choice: CleanUpChoice | undefined): ChoiceOption[] {
  switch (setting) {
    case 'corners': {
      const found = choice?.setting === 'corners' && choice.value.mode === 'manual' ? choice.value : null
      const set = settings.corners.mode === 'manual' ? settings.corners : null
      const manual = set ?? found
      return [
        { key: 'auto', label: 'Automatic', value: { mode: 'auto' } },
        { key: 'off', label: 'Take the photo as it is', value: { mode: 'off' } },
        ...(manual ? [{ key: 'manual', label: 'By the four corners on the source', value: manual }] : []),
      ]
    }
    case 'lightingEvening': {
      const strength = settings.lightingEvening.strength
      return [
        { key: 'auto', label: 'Automatic', value: { mode: 'auto', strength } },
        { key: 'on', label: 'On', value: { mode: 'on', strength } },
        { key: 'off', label: 'Off', value: { mode: 'off', strength } },
      ]
    }
    case 'inkColour': return [
      { key: 'auto', label: 'Automatic', value: 'auto' },
      { key: 'dark', label: 'Darkness (pencil, black or dark pen)', value: 'dark' },
      { key: 'colour', label: 'Colour against the paper (markers)', value: 'colour' },
    ]
    case 'dropoutColour': {
      const found = choice?.setting === 'dropoutColour' && choice.value.mode === 'colours' ? choice.value : null
      const set = settings.dropoutColour.mode === 'colours' ? settings.dropoutColour : null
      const colours = set ?? found
      return [
        { key: 'auto', label: 'Automatic', value: { mode: 'auto' } },
        { key: 'none', label: 'None', value: { mode: 'none' } },
        ...(colours ? [{ key: 'colours', label: `Read ${colours.colours.join(' and ')} as paper`, value: colours }] : []),
      ]
    }
    case 'paperLines': return [
      { key: 'auto', label: 'Automatic', value: 'auto' },
      { key: 'keep', label: 'Keep them', value: 'keep' },
      { key: 'remove', label: 'Take them out', value: 'remove' },
    ]
    case 'threshold': {
      const manual = settings.threshold.mode === 'manual' ? settings.threshold
        : { mode: 'manual' as const, value: 128 }
      const adaptive = settings.threshold.mode === 'adaptive' ? settings.threshold
        : choice?.setting === 'threshold' && choice.value.mode === 'adaptive' ? choice.value
          : { mode: 'adaptive' as const, windowMm: 8, k: 0.2, r: 127.5 }
      return [
        { key: 'auto', label: 'Automatic', value: { mode: 'auto' } },
        { key: 'otsu', label: 'One level for the sheet (Otsu)', value: { mode: 'otsu' } },
        { key: 'adaptive', label: 'A level for every spot (Sauvola)', value: adaptive },
        { key: 'manual', label: 'Set by hand on the histogram', value: manual },
      ]
    }
  }
}

/** Which option the settings hold now. */
export function selectedOption(setting: OverridableSetting, settings: PipelineSettings): string {
  const v = settings[setting]
  return typeof v === 'string' ? v : v.mode
}

/** The settings with a choice kept: its value written in as the setting (deep copy). */
export function keepChoice(settings: PipelineSettings, c: CleanUpChoice): PipelineSettings {
  return { ...settings, [c.setting]: structuredClone(c.value) } as PipelineSettings
}

/** The settings with an override list's option chosen. */
export function chooseOption(settings: PipelineSettings, setting: OverridableSetting, option: ChoiceOption): PipelineSettings {
  return { ...settings, [setting]: structuredClone(option.value) } as PipelineSettings
}

/** The choice of a setting in a run's list, if the run made one. */
export function choiceOf(choices: readonly CleanUpChoice[] | null | undefined, setting: CleanUpSetting): CleanUpChoice | undefined {
  return choices?.find((c) => c.setting === setting)
}
