/** The netlist fields (name, width, architecture, description), for creating and for editing. */
import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { NETLIST_KINDS, netlistDescription, netlistKind, netlistName, netlistWidth, type NetlistKind } from '../lib/rules';
import { Field, FormActions } from './ui';

// Form fields arrive as strings; the width is coerced, then held to the API's rule.
const netlistForm = z.object({
  name: netlistName,
  width: z.coerce.number<string>({ error: 'Width must be a number of bits' }).pipe(netlistWidth),
  kind: netlistKind,
  description: netlistDescription,
});
export type NetlistFormValues = z.output<typeof netlistForm>;

interface Props {
  initial: { name: string; width: number; kind: NetlistKind; description: string };
  submitLabel: string;
  pending: boolean;
  error: Error | null;
  onSubmit: (v: NetlistFormValues) => void;
  onCancel: () => void;
  className?: string;
}

export function NetlistForm({ initial, submitLabel, pending, error, onSubmit, onCancel, className = '' }: Props) {
  const { register, handleSubmit, formState } = useForm<z.input<typeof netlistForm>, unknown, NetlistFormValues>({
    resolver: zodResolver(netlistForm),
    defaultValues: { ...initial, width: String(initial.width) },
  });
  return (
    <form onSubmit={handleSubmit(onSubmit)} className={`grid gap-3 p-3 md:grid-cols-[1.2fr_0.6fr_0.8fr_2fr_auto] ${className}`} noValidate>
      <Field label="Name" error={formState.errors.name}>
        <input className="field mono" {...register('name')} placeholder="acc-skip-16" autoFocus />
      </Field>
      <Field label="Width (bits)" error={formState.errors.width}>
        <input className="field mono" inputMode="numeric" {...register('width')} />
      </Field>
      <Field label="Architecture" error={formState.errors.kind}>
        <select className="field" {...register('kind')}>
          {NETLIST_KINDS.map((k) => (
            <option key={k}>{k}</option>
          ))}
        </select>
      </Field>
      <Field label="Description (optional)" error={formState.errors.description}>
        <input className="field" {...register('description')} />
      </Field>
      <FormActions submitLabel={submitLabel} pending={pending} onCancel={onCancel} error={error} columns={5} />
    </form>
  );
}
