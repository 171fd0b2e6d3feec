// JSON shapes the Clerk SDKs read (Frontend API for clerk-js, Backend API for @clerk/nextjs/server).
// Only the fields the SDKs touch for e-mail + password sign-in and organizations are filled in.
import type { FakeClient, FakeMembership, FakeOrg, FakeSession, FakeUser, Store } from "./state";

const sec = (ms: number) => Math.floor(ms / 1000);

function verified(strategy: string) {
  return { object: "verification", status: "verified", strategy, attempts: 1, expire_at: null, verified_at_client: null };
}

export function emailJson(u: FakeUser) {
  return {
    id: u.emailId,
    object: "email_address",
    email_address: u.email,
    reserved: false,
    verification: verified("admin"),
    linked_to: [],
    matches_sso_connection: false,
    created_at: u.createdAt,
    updated_at: u.updatedAt,
  };
}

export function publicUserData(u: FakeUser) {
  return { first_name: u.firstName, last_name: u.lastName, image_url: "", has_image: false, identifier: u.email, user_id: u.id };
}

export function orgJson(store: Store, o: FakeOrg) {
  return {
    object: "organization",
    id: o.id,
    name: o.name,
    slug: o.slug,
    image_url: "",
    has_image: false,
    public_metadata: {},
    private_metadata: {},
    created_by: o.createdBy,
    created_at: o.createdAt,
    updated_at: o.updatedAt,
    members_count: store.membershipsOfOrg(o.id).length,
    pending_invitations_count: 0,
    admin_delete_enabled: true,
    max_allowed_memberships: 0,
  };
}

export function membershipJson(store: Store, m: FakeMembership) {
  const u = store.user(m.userId);
  const o = store.org(m.orgId)!;
  return {
    object: "organization_membership",
    id: m.id,
    role: m.role,
    role_name: m.role.replace(/^org:/, "").replace(/_/g, " "),
    permissions: [],
    public_metadata: {},
    private_metadata: {},
    organization: orgJson(store, o),
    public_user_data: u ? publicUserData(u) : undefined,
    created_at: m.createdAt,
    updated_at: m.updatedAt,
  };
}

/** A user as both APIs describe it (the Backend API adds a few fields the frontend ignores). */
export function userJson(store: Store, u: FakeUser) {
  return {
    object: "user",
    id: u.id,
    external_id: null,
    primary_email_address_id: u.emailId,
    primary_phone_number_id: null,
    primary_web3_wallet_id: null,
    image_url: "",
    has_image: false,
    username: null,
    email_addresses: [emailJson(u)],
    phone_numbers: [],
    web3_wallets: [],
    external_accounts: [],
    enterprise_accounts: [],
    saml_accounts: [],
    passkeys: [],
    organization_memberships: store.membershipsOfUser(u.id).map((m) => membershipJson(store, m)),
    password_enabled: true,
    profile_image_id: "",
    first_name: u.firstName,
    last_name: u.lastName,
    totp_enabled: false,
    backup_code_enabled: false,
    two_factor_enabled: false,
    public_metadata: {},
    private_metadata: {},
    unsafe_metadata: {},
    last_sign_in_at: u.lastSignInAt,
    last_active_at: u.lastSignInAt,
    banned: false,
    locked: false,
    create_organization_enabled: true,
    create_organizations_limit: null,
    delete_self_enabled: false,
    legal_accepted_at: null,
    timezone: null,
    created_at: u.createdAt,
    updated_at: u.updatedAt,
  };
}

export function sessionJson(store: Store, s: FakeSession, jwt: string) {
  const u = store.user(s.userId)!;
  return {
    object: "session",
    id: s.id,
    status: s.status,
    factor_verification_age: [0, -1],
    expire_at: s.createdAt + 7 * 24 * 3600 * 1000,
    abandon_at: s.createdAt + 30 * 24 * 3600 * 1000,
    last_active_at: s.updatedAt,
    last_active_token: { object: "token", jwt },
    last_active_organization_id: s.lastActiveOrgId,
    actor: null,
    tasks: null,
    user: userJson(store, u),
    public_user_data: publicUserData(u),
    created_at: s.createdAt,
    updated_at: s.updatedAt,
  };
}

export function signInJson(store: Store, c: FakeClient) {
  const si = c.signIn;
  if (!si) return null;
  const u = si.userId ? store.user(si.userId) : undefined;
  return {
    object: "sign_in",
    id: si.id,
    status: si.status,
    supported_identifiers: ["email_address"],
    identifier: si.identifier,
    user_data: u ? { first_name: u.firstName, last_name: u.lastName, image_url: "", has_image: false } : null,
    supported_first_factors: u ? [{ strategy: "password" }] : [],
    supported_second_factors: [],
    first_factor_verification: si.status === "complete" ? verified("password") : null,
    second_factor_verification: null,
    created_session_id: si.createdSessionId,
    abandon_at: Date.now() + 3600_000,
  };
}

export function signUpJson(c: FakeClient) {
  const su = c.signUp;
  if (!su) return null;
  const missing = [!su.email && "email_address", !su.password && "password"].filter(Boolean);
  return {
    object: "sign_up",
    id: su.id,
    status: su.status,
    required_fields: ["email_address", "password"],
    optional_fields: ["first_name", "last_name"],
    missing_fields: su.status === "complete" ? [] : missing,
    unverified_fields: [],
    verifications: { email_address: null, phone_number: null, web3_wallet: null, external_account: null },
    username: null,
    email_address: su.email,
    phone_number: null,
    web3_wallet: null,
    external_account_strategy: null,
    external_account: null,
    has_password: Boolean(su.password),
    unsafe_metadata: {},
    created_session_id: su.createdSessionId,
    created_user_id: su.createdUserId,
    abandon_at: Date.now() + 3600_000,
    legal_accepted_at: null,
    locale: null,
    timezone: null,
  };
}

export function clientJson(store: Store, c: FakeClient, tokenFor: (s: FakeSession) => string) {
  const sessions = c.sessionIds
    .map((id) => store.session(id))
    .filter((s): s is FakeSession => Boolean(s && s.status === "active"))
    .map((s) => sessionJson(store, s, tokenFor(s)));
  return {
    object: "client",
    id: c.id,
    sessions,
    sign_in: signInJson(store, c),
    sign_up: signUpJson(c),
    last_active_session_id: sessions.length ? c.lastActiveSessionId : null,
    last_authentication_strategy: null,
    captcha_bypass: false,
    cookie_expires_at: null,
    created_at: c.createdAt,
    updated_at: c.updatedAt,
  };
}

function attribute(enabled: boolean, required: boolean, firstFactor: boolean, strategies: string[] = []) {
  return {
    enabled,
    required,
    verifications: strategies,
    used_for_first_factor: firstFactor,
    first_factors: firstFactor ? strategies : [],
    used_for_second_factor: false,
    second_factors: [],
    verify_at_sign_up: false,
  };
}

export function environmentJson(appUrl: string) {
  const off = attribute(false, false, false);
  return {
    object: "environment",
    id: "env_triskel_local",
    auth_config: { object: "auth_config", id: "aac_triskel_local", single_session_mode: true, claimed_at: null, reverification: false },
    display_config: {
      object: "display_config",
      id: "display_config_triskel_local",
      instance_environment_type: "production",
      application_name: "Triskel",
      theme: {
        buttons: { font_color: "#ffffff", font_family: "sans-serif", font_weight: "600" },
        general: {
          color: "#1f8f7d",
          padding: "1em",
          box_shadow: "none",
          font_color: "#14212b",
          font_family: "sans-serif",
          border_radius: "0.5em",
          background_color: "#ffffff",
          label_font_weight: "600",
        },
        accounts: { background_color: "#ffffff" },
      },
      preferred_sign_in_strategy: "password",
      logo_image_url: "",
      favicon_image_url: "",
      home_url: appUrl,
      sign_in_url: `${appUrl}/sign-in`,
      sign_up_url: `${appUrl}/sign-up`,
      user_profile_url: `${appUrl}/workspace`,
      waitlist_url: `${appUrl}/sign-up`,
      after_sign_in_url: `${appUrl}/networks`,
      after_sign_up_url: `${appUrl}/networks`,
      after_sign_out_one_url: `${appUrl}/sign-in`,
      after_sign_out_all_url: `${appUrl}/sign-in`,
      after_switch_session_url: `${appUrl}/networks`,
      after_join_waitlist_url: appUrl,
      organization_profile_url: `${appUrl}/workspace`,
      create_organization_url: `${appUrl}/workspace`,
      after_leave_organization_url: `${appUrl}/networks`,
      after_create_organization_url: `${appUrl}/networks`,
      support_email: "",
      branded: false,
      show_devmode_warning: false,
      captcha_public_key: null,
      captcha_widget_type: "invisible",
      captcha_public_key_invisible: null,
      captcha_provider: "turnstile",
      captcha_oauth_bypass: null,
      terms_url: "",
      privacy_policy_url: "",
    },
    user_settings: {
      attributes: {
        email_address: attribute(true, true, true, ["email_code"]),
        phone_number: off,
        username: off,
        web3_wallet: off,
        first_name: attribute(true, false, false),
        last_name: attribute(true, false, false),
        password: attribute(true, true, false),
        authenticator_app: off,
        ticket: off,
        backup_code: off,
        passkey: off,
      },
      actions: { delete_self: false, create_organization: true },
      social: {},
      enterprise_sso: { enabled: false, self_serve_sso: false, self_serve_directory_sync: false },
      saml: { enabled: false },
      sign_in: { second_factor: { required: false, enabled: false } },
      sign_up: { allowlist_only: false, progressive: true, captcha_enabled: false, mode: "public", legal_consent_enabled: false },
      password_settings: {
        allowed_special_characters: "!\"#$%&'()*+,-./:;<=>?@[]^_`{|}~",
        disable_hibp: true,
        min_length: 8,
        max_length: 72,
        require_special_char: false,
        require_numbers: false,
        require_uppercase: false,
        require_lowercase: false,
        show_zxcvbn: false,
        min_zxcvbn_strength: 0,
      },
      passkey_settings: { allow_autofill: false, show_sign_in_button: false },
      username_settings: { min_length: 4, max_length: 64 },
      attack_protection: { enumeration_protection: { enabled: false } },
    },
    organization_settings: {
      enabled: true,
      max_allowed_memberships: 0,
      force_organization_selection: false,
      actions: { admin_delete: true },
      domains: { enabled: false, enrollment_modes: [], default_role: null },
      slug: { disabled: false },
      organization_creation_defaults: { enabled: false },
    },
    commerce_settings: {
      billing: { stripe_publishable_key: null, organization: { enabled: false, has_paid_plans: false }, user: { enabled: false, has_paid_plans: false } },
    },
    api_keys_settings: { user_api_keys_enabled: false, orgs_api_keys_enabled: false },
    protect_config: { object: "protect_config", id: "protect_config_triskel_local" },
    maintenance_mode: false,
  };
}

export { sec };
