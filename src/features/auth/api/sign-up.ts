import { useMutation } from '@tanstack/react-query';
import { signUpBody, type SignUpBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';

export const signUpInputSchema = signUpBody;
export type SignUpInput = SignUpBody;

/** Asks for an account: the answer is always "check your mail"; nobody is signed in yet. */
export function signUp(input: SignUpInput) {
  return callRoute('signUp', { body: input });
}

export function useSignUp() {
  return useMutation({ mutationFn: signUp });
}
