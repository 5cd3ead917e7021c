import { z } from "zod";

/**
 * The institution's number for a student, as the mark export carries it. Institutions write them with
 * letters, digits and the odd separator ("s1234567", "2026-0042", "AB/12.3"), so those are what is
 * allowed; anything else (a comma, a quote, a stray control character) is a typo or a pasted cell.
 */
export const studentNumberPattern = /^[A-Za-z0-9](?:[A-Za-z0-9 ./-]*[A-Za-z0-9])?$/;
export const studentNumberMaxLength = 32;

export const studentNumber = z
  .string()
  .trim()
  .max(studentNumberMaxLength, `A student number has at most ${studentNumberMaxLength} characters.`)
  .regex(studentNumberPattern, "A student number has letters and digits, with spaces, dots, hyphens or slashes between them.");
