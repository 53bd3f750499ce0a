import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CableTypeInput, CableTypeView } from '../../../../shared/schemas/cables';
import { api } from '../../../lib/api-client';

export type CableFormValues = CableTypeInput;

export const createCable = (input: CableFormValues) => api<CableTypeView>('/api/cables', { method: 'POST', body: input });
export const updateCable = ({ id, ...patch }: Partial<CableFormValues> & { id: number; reason: string }) =>
  api<CableTypeView>(`/api/cables/${id}`, { method: 'PATCH', body: patch });

/** Every cable query (list, entry, history, calibrations) starts with 'cables'. */
function useCableMutation<TIn, TOut>(fn: (input: TIn) => Promise<TOut>) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => qc.invalidateQueries({ queryKey: ['cables'] }) });
}

export const useCreateCable = () => useCableMutation(createCable);
export const useUpdateCable = () => useCableMutation(updateCable);
