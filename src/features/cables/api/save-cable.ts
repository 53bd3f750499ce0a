import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CableTypeInput, CableTypeView } from '../../../../shared/schemas/cables';
import { api, ApiError } from '../../../lib/api-client';

export type CableFormValues = CableTypeInput;

export const createCable = (input: CableFormValues) => api<CableTypeView>('/api/cables', { method: 'POST', body: input });
export const updateCable = ({ id, ...patch }: Partial<CableFormValues> & { id: number; reason: string; basedOn?: Partial<CableFormValues> }) =>
  api<CableTypeView>(`/api/cables/${id}`, { method: 'PATCH', body: patch });

/** Every cable query (list, entry, history, calibrations) starts with 'cables'. */
function useCableMutation<TIn, TOut>(fn: (input: TIn) => Promise<TOut>) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: fn,
    onSuccess: () => qc.invalidateQueries({ queryKey: ['cables'] }),
    // A refusal because someone else saved meanwhile: show their change (values, history) beside the open form.
    onError: (e) => (e instanceof ApiError && e.code === 'changed_meanwhile' ? qc.invalidateQueries({ queryKey: ['cables'] }) : undefined),
  });
}

export const useCreateCable = () => useCableMutation(createCable);
export const useUpdateCable = () => useCableMutation(updateCable);
