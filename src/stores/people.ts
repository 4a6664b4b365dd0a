import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import {
  inboxListSchema,
  signInAuditListSchema,
  type InboxMessage,
  type SignInAuditEntry,
} from '../../shared/schemas/audit';
import {
  inviteUserSchema,
  updateUserSchema,
  userEnvelopeSchema,
  userListSchema,
  type InviteUserRequest,
  type UpdateUserRequest,
  type UserDto,
} from '../../shared/schemas/users';
import { mailProblemListSchema, type MailProblem } from '../../shared/schemas/mail';
import { api, ApiRequestError, describeError } from '../services/api';
import { fieldErrorOf, fieldErrorsFrom, type FieldErrors } from './form-errors';
import { fieldsFromZod } from '../../shared/schemas/errors';

/** How a person's account stands, in the order the list sorts them. */
export type PersonStatus = 'active' | 'pending' | 'deactivated';

/** Deactivation wins over a pending invitation: a deactivated person cannot use the link either. */
export function personStatus(person: UserDto): PersonStatus {
  if (!person.active) return 'deactivated';
  if (!person.hasPassword) return 'pending';
  return 'active';
}

/** People whose name or e-mail contains the search text, ignoring case and extra spaces. */
export function filterPeople(people: readonly UserDto[], search: string): UserDto[] {
  const needle = search.trim().toLowerCase();
  if (!needle) return [...people];
  return people.filter((p) => p.displayName.toLowerCase().includes(needle) || p.email.toLowerCase().includes(needle));
}

/** The people list and the invite and edit forms of the admin's People screen. */
export const usePeopleStore = defineStore('people', () => {
  const people = ref<UserDto[]>([]);
  const loading = ref(false);
  const loaded = ref(false);
  const loadProblem = ref('');
  const search = ref('');
  const visible = computed(() => filterPeople(people.value, search.value));

  // One form is open at a time (invite or edit), so they share one saving state.
  const saving = ref(false);
  const saveProblem = ref('');
  const fieldErrors = ref<FieldErrors>({});

  let inFlight: Promise<void> | null = null;

  /** Loads the whole list; concurrent callers share one request. */
  function load(): Promise<void> {
    inFlight ??= (async () => {
      loading.value = true;
      loadProblem.value = '';
      try {
        const answer = await api('/users', { schema: userListSchema });
        people.value = answer.items;
        loaded.value = true;
      } catch (error) {
        loadProblem.value = describeError(error);
      } finally {
        loading.value = false;
        inFlight = null;
      }
    })();
    return inFlight;
  }

  /** The message for one field of the open form, or for anything under it. */
  function errorOf(path: string): string {
    return fieldErrorOf(fieldErrors.value, path);
  }

  function resetForm() {
    saving.value = false;
    saveProblem.value = '';
    fieldErrors.value = {};
  }

  function upsert(person: UserDto) {
    const i = people.value.findIndex((p) => p.id === person.id);
    if (i === -1) people.value = [...people.value, person];
    else people.value = people.value.map((p) => (p.id === person.id ? person : p));
  }

  function refuse(error: unknown) {
    if (error instanceof ApiRequestError && error.fields.length > 0) {
      fieldErrors.value = fieldErrorsFrom(error.fields);
      saveProblem.value = error.message;
    } else if (error instanceof ApiRequestError && error.code === 'email_taken') {
      // The server names no field for a taken e-mail; it belongs on the e-mail field all the same.
      fieldErrors.value = { email: error.message };
      saveProblem.value = '';
    } else {
      saveProblem.value = describeError(error);
    }
  }

  /** Runs one form submission; answers null when refused, with the reasons kept in the store. */
  async function submit<T>(work: () => Promise<T>): Promise<T | null> {
    saving.value = true;
    saveProblem.value = '';
    fieldErrors.value = {};
    try {
      return await work();
    } catch (error) {
      refuse(error);
      return null;
    } finally {
      saving.value = false;
    }
  }

  /** Invites a person; the server sends the invitation e-mail. */
  async function invite(input: InviteUserRequest): Promise<UserDto | null> {
    const parsed = inviteUserSchema.safeParse(input);
    if (!parsed.success) {
      fieldErrors.value = fieldErrorsFrom(fieldsFromZod(parsed.error));
      saveProblem.value = '';
      return null;
    }
    return submit(async () => {
      const { user } = await api('/users', { method: 'POST', body: parsed.data, schema: userEnvelopeSchema });
      upsert(user);
      return user;
    });
  }

  /** Changes some of a person's fields. */
  async function update(id: string, patch: UpdateUserRequest): Promise<UserDto | null> {
    const parsed = updateUserSchema.safeParse(patch);
    if (!parsed.success) {
      fieldErrors.value = fieldErrorsFrom(fieldsFromZod(parsed.error));
      saveProblem.value = fieldErrors.value['(body)'] ?? '';
      return null;
    }
    return submit(async () => {
      const { user } = await api(`/users/${encodeURIComponent(id)}`, { method: 'PATCH', body: parsed.data, schema: userEnvelopeSchema });
      upsert(user);
      return user;
    });
  }

  /** Deactivating signs the person out everywhere (the server revokes their sessions). */
  function setActive(id: string, active: boolean): Promise<UserDto | null> {
    return update(id, { active });
  }

  /** Sends a fresh invitation link to someone who has not set a password yet. */
  async function resendInvitation(id: string): Promise<boolean> {
    const done = await submit(async () => {
      await api(`/users/${encodeURIComponent(id)}/invitation`, { method: 'POST' });
      return true;
    });
    return done === true;
  }

  return {
    people,
    loading,
    loaded,
    loadProblem,
    search,
    visible,
    saving,
    saveProblem,
    fieldErrors,
    errorOf,
    load,
    resetForm,
    invite,
    update,
    setActive,
    resendInvitation,
  };
});

/** The most recent sign-in audit entries, newest first as the server sends them. */
export const useSignInAuditStore = defineStore('sign-in-audit', () => {
  const entries = ref<SignInAuditEntry[]>([]);
  const loading = ref(false);
  const loaded = ref(false);
  const problem = ref('');

  async function load(limit = 200) {
    if (loading.value) return;
    loading.value = true;
    problem.value = '';
    try {
      entries.value = (await api(`/audit/sign-ins?limit=${limit}`, { schema: signInAuditListSchema })).items;
      loaded.value = true;
    } catch (error) {
      problem.value = describeError(error);
    } finally {
      loading.value = false;
    }
  }

  return { entries, loading, loaded, problem, load };
});

/** Messages caught by the demo's built-in mail server; absent outside demo mode. */
export const useTestInboxStore = defineStore('test-inbox', () => {
  const messages = ref<InboxMessage[]>([]);
  /** null until asked; false when the server has no test inbox, so the screen hides it. */
  const available = ref<boolean | null>(null);
  const loading = ref(false);
  const problem = ref('');

  async function load() {
    if (loading.value) return;
    loading.value = true;
    problem.value = '';
    try {
      const answer = await api('/dev/inbox', { schema: inboxListSchema });
      // Newest first: the invitation just sent is the one the admin is looking for.
      messages.value = [...answer.items].sort((a, b) => b.at.localeCompare(a.at));
      available.value = true;
    } catch (error) {
      if (error instanceof ApiRequestError && (error.status === 404 || error.status === 403)) available.value = false;
      else problem.value = describeError(error);
    } finally {
      loading.value = false;
    }
  }

  return { messages, available, loading, problem, load };
});

/** E-mails for the record that failed or wait for another try (admins only). */
export const useMailProblemsStore = defineStore('mail-problems', () => {
  const items = ref<MailProblem[]>([]);
  const loading = ref(false);
  const loaded = ref(false);
  const problem = ref('');

  async function load() {
    if (loading.value) return;
    loading.value = true;
    problem.value = '';
    try {
      items.value = (await api('/mail/problems', { schema: mailProblemListSchema })).items;
      loaded.value = true;
    } catch (error) {
      problem.value = describeError(error);
    } finally {
      loading.value = false;
    }
  }

  return { items, loading, loaded, problem, load };
});
