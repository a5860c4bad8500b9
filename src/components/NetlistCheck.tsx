/** The engine's reading of one revision: top module, adder ports and lint findings (never colour alone: icon and word too). */
import type { ReactNode } from 'react';
import { Panel } from './ui';

export interface Finding {
  code: string;
  message: string;
  where: string;
}

export interface NetlistCheckResult {
  top: string;
  modules: number;
  adder: { width: number; a: string; b: string; cin: string | null; sum: string; cout: string | null } | null;
  errors: Finding[];
  warnings: Finding[];
}

function FindingRow({ finding, severity }: { finding: Finding; severity: 'error' | 'warning' }) {
  const tone = severity === 'error' ? 'text-bad' : 'text-warn';
  return (
    <li className="grid grid-cols-[92px_150px_minmax(0,1fr)] gap-2 border-t border-line px-3 py-1.5 text-[13px]">
      <span className={`mono font-semibold ${tone}`}>
        <span aria-hidden>{severity === 'error' ? '✕ ' : '! '}</span>
        {severity}
      </span>
      <span className="mono text-[12px] text-muted">{finding.code}</span>
      <span>
        <span className="mono text-[12px]">{finding.where}</span>: {finding.message}
      </span>
    </li>
  );
}

function Summary({ check }: { check: NetlistCheckResult }): ReactNode {
  const { adder } = check;
  if (!adder) return <>top module <span className="mono">{check.top || '—'}</span>; adder ports not resolved until the errors below are fixed</>;
  return (
    <>
      top module <span className="mono">{check.top}</span> · {adder.width}-bit adder: <span className="mono">{adder.a}</span> +{' '}
      <span className="mono">{adder.b}</span>
      {adder.cin ? (
        <>
          {' '}+ <span className="mono">{adder.cin}</span>
        </>
      ) : (
        ' (no carry-in)'
      )}{' '}
      → <span className="mono">{adder.sum}</span>
      {adder.cout ? (
        <>
          , <span className="mono">{adder.cout}</span>
        </>
      ) : (
        ' (no carry-out)'
      )}
    </>
  );
}

export function NetlistCheck({ check, declaredWidth }: { check: NetlistCheckResult; declaredWidth: number | null }) {
  const { errors, warnings } = check;
  const verdict =
    errors.length > 0 ? (
      <span className="mono text-[12px] font-semibold text-bad">✕ {errors.length} lint error{errors.length === 1 ? '' : 's'}</span>
    ) : (
      <span className="mono text-[12px] font-semibold text-ok">✓ lint clean{warnings.length ? `, ${warnings.length} warning${warnings.length === 1 ? '' : 's'}` : ''}</span>
    );
  const widthMismatch = check.adder && declaredWidth !== null && check.adder.width !== declaredWidth;
  return (
    <Panel title="Netlist check" id="check-title" actions={verdict}>
      <p className="px-3 py-2 text-[13px]">
        <Summary check={check} />
      </p>
      {widthMismatch && (
        <p className="px-3 pb-2 text-[13px] text-warn">
          <span aria-hidden>! </span>warning: the netlist is recorded as {declaredWidth} bits but this revision's adder ports are {check.adder!.width} bits wide.
        </p>
      )}
      {errors.length + warnings.length > 0 && (
        <ul aria-label="lint findings">
          {errors.map((f, i) => (
            <FindingRow key={`e${i}`} finding={f} severity="error" />
          ))}
          {warnings.map((f, i) => (
            <FindingRow key={`w${i}`} finding={f} severity="warning" />
          ))}
        </ul>
      )}
    </Panel>
  );
}
