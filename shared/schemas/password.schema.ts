import { z } from 'zod'
import { PASSWORD_RULE, passwordProblem } from '../passwords.ts'

/** A password being chosen (sign-up, reset, invitation): the rule of shared/passwords.ts. */
export const NewPasswordSchema = z.string().max(200).superRefine((p, ctx) => {
  const problem = passwordProblem(p)
  if (problem) ctx.addIssue({ code: 'custom', message: problem })
}).meta({ description: PASSWORD_RULE })
