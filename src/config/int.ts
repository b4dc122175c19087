import { z } from 'zod';

/** A whole number above zero (counts, durations, sizes). */
export const positiveInt = z.number().int().positive();
