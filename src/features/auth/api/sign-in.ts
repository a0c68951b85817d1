import { useMutation, useQueryClient } from '@tanstack/react-query';
import { signInBody, type SignInBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const signInInputSchema = signInBody;
export type SignInInput = SignInBody;

export function signIn(input: SignInInput) {
  return callRoute('signIn', { body: input });
}

export function useSignIn() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: signIn,
    onSuccess: async ({ user }) => {
      // a different person may be signing in on this browser: forget everything cached
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== 'me' });
      qc.setQueryData(queryKeys.me, user);
    },
  });
}
