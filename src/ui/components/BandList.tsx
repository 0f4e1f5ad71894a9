import type { NextReading, ReadingBand } from '../../engine/diagnosis/types';
import type { UnitSettings } from '../../store/settings';
import { formatBand, formatMeterValue } from '../format';
import { readingName } from '../readings';

/** What a healthy unit reads on this meter: one row per reading, with the meter mode. */
export function BandList({ bands, guides, units, caption = 'What a healthy unit reads' }: { bands: readonly ReadingBand[]; guides: readonly NextReading[]; units: UnitSettings; caption?: string }) {
  return (
    <table class="readings bands">
      <caption>{caption}</caption>
      <thead>
        <tr>
          <th scope="col">Reading</th>
          <th scope="col">Expected</th>
        </tr>
      </thead>
      <tbody>
        {bands.map((band) => {
          const guide = guides.find((g) => g.kind === band.kind && g.target === band.target);
          return (
            <tr key={`${band.kind}:${band.target ?? ''}`}>
              <th scope="row">
                {readingName(band.kind, band.target)}
                {guide ? <span class="meter-mode">{guide.meterMode}{guide.powerOff ? ', power off' : ''}</span> : null}
              </th>
              <td>
                {formatBand(band, units.decimal)}
                {band.expectOverload || band.nominal === 'OL' ? null : <span class="meter-mode">about {formatMeterValue(band.nominal, band.unit, units.decimal)}</span>}
              </td>
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}
