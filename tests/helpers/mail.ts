/**
 * An SMTP address that refuses every connection at once (ECONNREFUSED). Port 1 is served on no
 * machine we run on. A port taken from the system and let go, as these tests once used, can be
 * handed straight to a server of another test running beside them, which then keeps the mail
 * client waiting for a greeting for half a minute instead of refusing it.
 */
export const REFUSING_SMTP_URL = 'smtp://127.0.0.1:1';
