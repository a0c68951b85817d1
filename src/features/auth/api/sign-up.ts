import { useMutation, useQueryClient } from '@tanstack/react-query';
import { signUpBody, type SignUpBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const signUpInputSchema = signUpBody;
export type SignUpInput = SignUpBody;

export function signUp(input: SignUpInput) {
  return callRoute('signUp', { body: input });
}

export function useSignUp() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: signUp,
    onSuccess: ({ user }) => {
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== 'me' });
      qc.setQueryData(queryKeys.me, user);
    },
  });
}
