/** The project fields (name, description), for creating and for renaming. */
import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { projectDescription, projectName } from '../lib/rules';
import { Field, FormActions } from './ui';

const projectForm = z.object({ name: projectName, description: projectDescription });
export type ProjectFormValues = z.infer<typeof projectForm>;

interface Props {
  initial: ProjectFormValues;
  submitLabel: string;
  pending: boolean;
  error: Error | null;
  onSubmit: (v: ProjectFormValues) => void;
  onCancel: () => void;
  className?: string;
}

export function ProjectForm({ initial, submitLabel, pending, error, onSubmit, onCancel, className = '' }: Props) {
  const { register, handleSubmit, formState } = useForm({ resolver: zodResolver(projectForm), defaultValues: initial });
  return (
    <form onSubmit={handleSubmit(onSubmit)} className={`grid gap-3 p-3 md:grid-cols-[1fr_2fr_auto] ${className}`} noValidate>
      <Field label="Project name" error={formState.errors.name}>
        <input className="field" {...register('name')} autoFocus />
      </Field>
      <Field label="Description (optional)" error={formState.errors.description}>
        <input className="field" {...register('description')} />
      </Field>
      <FormActions submitLabel={submitLabel} pending={pending} onCancel={onCancel} error={error} columns={3} />
    </form>
  );
}
