"""Legwork settings: everything a deployment changes comes from environment variables (legwork.env).

Development (the default, DEBUG on) needs nothing set: SQLite in var/, a secret generated once into
var/secret_key. Production sets LEGWORK_DEBUG=0, LEGWORK_SECRET_KEY, LEGWORK_ALLOWED_HOSTS and
usually DATABASE_URL.
"""

import secrets
from datetime import timedelta
from pathlib import Path

from django.core.exceptions import ImproperlyConfigured

from legwork.env import database_from_url, default_storage_from_env, env_bool, env_int, env_list, env_str

BASE_DIR = Path(__file__).resolve().parent.parent
VAR_DIR = Path(env_str("LEGWORK_VAR_DIR", str(BASE_DIR / "var")))

DEBUG = env_bool("LEGWORK_DEBUG", True)


def _secret_key() -> str:
    key = env_str("LEGWORK_SECRET_KEY")
    if key:
        return key
    if not DEBUG:
        raise ImproperlyConfigured("LEGWORK_SECRET_KEY must be set when LEGWORK_DEBUG is off.")
    path = VAR_DIR / "secret_key"  # development only; var/ is kept out of git
    if not path.exists():
        VAR_DIR.mkdir(parents=True, exist_ok=True)
        path.write_text(secrets.token_urlsafe(50))
        path.chmod(0o600)
    return path.read_text().strip()


SECRET_KEY = _secret_key()
ALLOWED_HOSTS = env_list("LEGWORK_ALLOWED_HOSTS", ["127.0.0.1", "localhost", "[::1]"] if DEBUG else [])
CSRF_TRUSTED_ORIGINS = env_list("LEGWORK_CSRF_TRUSTED_ORIGINS", [])

INSTALLED_APPS = [
    "django.contrib.admin",
    "django.contrib.auth",
    "django.contrib.contenttypes",
    "django.contrib.sessions",
    "django.contrib.messages",
    "whitenoise.runserver_nostatic",
    "django.contrib.staticfiles",
    "crispy_forms",
    "crispy_bootstrap5",
    "template_partials",
    "django_filters",
    "django_tasks",
    "django_tasks_db",
    "axes",
    "core",
    "procedures",
    "inspections",
    "demo",
]

MIDDLEWARE = [
    "django.middleware.security.SecurityMiddleware",
    "whitenoise.middleware.WhiteNoiseMiddleware",
    "core.middleware.RequestLimits",  # before anything reads the body (core/middleware.py)
    "core.middleware.PrivacyHeaders",
    "django.contrib.sessions.middleware.SessionMiddleware",
    "django.middleware.common.CommonMiddleware",
    "django.middleware.csrf.CsrfViewMiddleware",
    "django.contrib.auth.middleware.AuthenticationMiddleware",
    "django.contrib.auth.middleware.LoginRequiredMiddleware",
    "core.middleware.acting_user",
    "django.contrib.messages.middleware.MessageMiddleware",
    "django.middleware.clickjacking.XFrameOptionsMiddleware",
    "csp.middleware.CSPMiddleware",
    "core.middleware.FaultPages",
    "axes.middleware.AxesMiddleware",  # last, as django-axes asks
]

ROOT_URLCONF = "legwork.urls"
WSGI_APPLICATION = "legwork.wsgi.application"

TEMPLATES = [
    {
        "BACKEND": "django.template.backends.django.DjangoTemplates",
        "DIRS": [BASE_DIR / "templates"],
        "APP_DIRS": True,
        "OPTIONS": {
            "context_processors": [
                "django.template.context_processors.request",
                "django.contrib.auth.context_processors.auth",
                "django.contrib.messages.context_processors.messages",
                "core.roles.role_context",
            ],
        },
    },
]

_database_url = env_str("DATABASE_URL")
if _database_url:
    DATABASES = {"default": database_from_url(_database_url)}
else:
    # Several people at once on one machine: WAL lets readers go on while one writer writes,
    # IMMEDIATE takes the write lock at BEGIN (no upgrade deadlock), the timeout waits instead of failing.
    DATABASES = {
        "default": {
            "ENGINE": "django.db.backends.sqlite3",
            "NAME": Path(env_str("LEGWORK_SQLITE_PATH", str(VAR_DIR / "legwork.sqlite3"))),
            "OPTIONS": {
                "init_command": "PRAGMA journal_mode=WAL; PRAGMA synchronous=NORMAL; PRAGMA foreign_keys=ON;",
                "transaction_mode": "IMMEDIATE",
                "timeout": 20,
            },
        }
    }

DEFAULT_AUTO_FIELD = "django.db.models.BigAutoField"
AUTH_USER_MODEL = "core.User"
LOGIN_URL = "login"
LOGIN_REDIRECT_URL = "home"
LOGOUT_REDIRECT_URL = "login"
CSRF_FAILURE_VIEW = "core.views.csrf_failure"

# Sign-in throttling (django-axes): after LEGWORK_LOGIN_FAILURES wrong passwords for one user name from one address,
# that pair is refused for LEGWORK_LOGIN_LOCKOUT_MINUTES without checking a password; a QA lead can lift it early
# (core.views.lockouts). By the pair, not the address alone (a shop's tablets share one address) nor the user
# alone (anyone could lock the QA lead out). docs/decisions/2026-12-04-sign-ins-and-sessions.md.
AUTHENTICATION_BACKENDS = ["axes.backends.AxesStandaloneBackend", "django.contrib.auth.backends.ModelBackend"]
AXES_FAILURE_LIMIT = env_int("LEGWORK_LOGIN_FAILURES", 5)
AXES_COOLOFF_TIME = timedelta(minutes=env_int("LEGWORK_LOGIN_LOCKOUT_MINUTES", 15))
AXES_LOCKOUT_PARAMETERS = [["username", "ip_address"]]
AXES_RESET_ON_SUCCESS = True
AXES_LOCKOUT_CALLABLE = "core.security.lockout_response"
AXES_CLIENT_IP_CALLABLE = "core.security.client_ip"
AXES_USERNAME_CALLABLE = "core.security.attempted_username"
AXES_VERBOSE = True

# Sessions: a tablet is shared by a crew, so a sign-in lasts a shift (LEGWORK_SESSION_HOURS from sign-in, not
# renewed by activity), and with LEGWORK_SESSION_AT_BROWSER_CLOSE=1 also ends when the browser closes.
SESSION_COOKIE_AGE = env_int("LEGWORK_SESSION_HOURS", 12) * 3600
SESSION_EXPIRE_AT_BROWSER_CLOSE = env_bool("LEGWORK_SESSION_AT_BROWSER_CLOSE", False)
SESSION_SAVE_EVERY_REQUEST = False

AUTH_PASSWORD_VALIDATORS = [
    {"NAME": "django.contrib.auth.password_validation.UserAttributeSimilarityValidator"},
    {"NAME": "django.contrib.auth.password_validation.MinimumLengthValidator", "OPTIONS": {"min_length": 10}},
    {"NAME": "django.contrib.auth.password_validation.CommonPasswordValidator"},
    {"NAME": "django.contrib.auth.password_validation.NumericPasswordValidator"},
]

LANGUAGE_CODE = "en-us"
TIME_ZONE = env_str("LEGWORK_TIME_ZONE", "America/Chicago")
USE_I18N = True
USE_TZ = True

STATIC_URL = "static/"
STATICFILES_DIRS = [BASE_DIR / "static"]
STATIC_ROOT = Path(env_str("LEGWORK_STATIC_ROOT", str(VAR_DIR / "static")))
# Photos, reports and PDFs: never under STATIC and never served by URL; views check the user first.
MEDIA_ROOT = Path(env_str("LEGWORK_MEDIA_ROOT", str(VAR_DIR / "media")))
STORAGES = {
    # Whole files or none: a full disk leaves no truncated file (core/storage.py). On several machines,
    # LEGWORK_STORAGE=s3 and LEGWORK_S3_* put them in one S3-compatible bucket (core/object_storage.py).
    "default": default_storage_from_env(),
    "staticfiles": {
        "BACKEND": "whitenoise.storage.CompressedManifestStaticFilesStorage"
        if not DEBUG
        else "django.contrib.staticfiles.storage.StaticFilesStorage"
    },
}

CRISPY_ALLOWED_TEMPLATE_PACKS = "bootstrap5"
CRISPY_TEMPLATE_PACK = "bootstrap5"

# Background work (packet PDFs): the database backend with a worker (`manage.py db_worker`);
# LEGWORK_TASKS_INLINE=1 (tests, a one-person shop) runs tasks at once in the request.
TASKS = {
    "default": {
        "BACKEND": "django_tasks.backends.immediate.ImmediateBackend"
        if env_bool("LEGWORK_TASKS_INLINE", DEBUG)
        else "django_tasks_db.backend.DatabaseBackend"
    }
}

# Upload limits: a tablet photo is a few MB; anything far larger is refused before Pillow sees it.
DATA_UPLOAD_MAX_MEMORY_SIZE = 5 * 1024 * 1024
FILE_UPLOAD_MAX_MEMORY_SIZE = 5 * 1024 * 1024
LEGWORK_PHOTO_MAX_BYTES = env_int("LEGWORK_PHOTO_MAX_BYTES", 15 * 1024 * 1024)
# Pixels decoded at full size (PNG, WebP): about 3 bytes each, 4 with transparency (inspections/photos.py).
LEGWORK_PHOTO_MAX_PIXELS = env_int("LEGWORK_PHOTO_MAX_PIXELS", 16_000_000)
# A JPEG is decoded at a reduced scale (Pillow's draft mode), so a larger camera picture is read within bounds.
LEGWORK_PHOTO_MAX_JPEG_PIXELS = env_int("LEGWORK_PHOTO_MAX_JPEG_PIXELS", 64_000_000)
LEGWORK_REPORT_MAX_BYTES = env_int("LEGWORK_REPORT_MAX_BYTES", 10 * 1024 * 1024)  # welder test reports
# A traveler or packet PDF dropped on the document check page: hashed as it arrives, never stored.
LEGWORK_CHECK_MAX_BYTES = env_int("LEGWORK_CHECK_MAX_BYTES", 256 * 1024 * 1024)
# A request body larger than this is refused before it is read (core.middleware.RequestLimits): the largest
# upload plus room for the form around it.
LEGWORK_MAX_REQUEST_BYTES = env_int(
    "LEGWORK_MAX_REQUEST_BYTES", max(LEGWORK_PHOTO_MAX_BYTES, LEGWORK_REPORT_MAX_BYTES) + 1024 * 1024)

# The browser features a page may use: the camera (photos at the weld) and nothing else.
LEGWORK_PERMISSIONS_POLICY = (
    "camera=(self), microphone=(), geolocation=(), payment=(), usb=(), serial=(), bluetooth=(), hid=(), midi=(), "
    "accelerometer=(), gyroscope=(), magnetometer=(), display-capture=(), screen-wake-lock=(), "
    "xr-spatial-tracking=(), publickey-credentials-get=(), idle-detection=(), browsing-topics=()"
)

CONTENT_SECURITY_POLICY = {
    "DIRECTIVES": {
        "default-src": ["'self'"],
        "img-src": ["'self'", "data:", "blob:"],
        "style-src": ["'self'"],
        "script-src": ["'self'"],
        "frame-ancestors": ["'none'"],
        "form-action": ["'self'"],
    }
}

SESSION_COOKIE_HTTPONLY = True
SECURE_CONTENT_TYPE_NOSNIFF = True
X_FRAME_OPTIONS = "DENY"
if not DEBUG:
    SECURE_SSL_REDIRECT = env_bool("LEGWORK_SSL_REDIRECT", True)
    SESSION_COOKIE_SECURE = True
    CSRF_COOKIE_SECURE = True
    SECURE_HSTS_SECONDS = env_int("LEGWORK_HSTS_SECONDS", 60 * 60 * 24 * 30)
    SECURE_HSTS_INCLUDE_SUBDOMAINS = env_bool("LEGWORK_HSTS_SUBDOMAINS", True)
    SECURE_HSTS_PRELOAD = env_bool("LEGWORK_HSTS_PRELOAD", False)
    if not SECURE_HSTS_PRELOAD:
        # Preloading commits a whole domain to HTTPS in every browser; a shop's own server name rarely
        # should be. Off by default, on with LEGWORK_HSTS_PRELOAD=1.
        SILENCED_SYSTEM_CHECKS = ["security.W021"]

# Behind a TLS-terminating reverse proxy that sets X-Forwarded-Proto and X-Forwarded-For: only then are those
# headers believed (for HTTPS detection and the address sign-in throttling counts by). Off by default: a client
# could otherwise claim HTTPS, or a new address for every password it tries.
LEGWORK_BEHIND_PROXY = env_bool("LEGWORK_BEHIND_PROXY", False)
SECURE_PROXY_SSL_HEADER = ("HTTP_X_FORWARDED_PROTO", "https") if LEGWORK_BEHIND_PROXY else None

LOGGING = {
    "version": 1,
    "disable_existing_loggers": False,
    "handlers": {"console": {"class": "logging.StreamHandler"}},
    "root": {"handlers": ["console"], "level": env_str("LEGWORK_LOG_LEVEL", "WARNING")},
    # Security events (sign-in failures and lockouts, unlocks, refused uploads, faults) at INFO and above.
    "loggers": {
        "legwork.security": {"level": "INFO"},
        "legwork.faults": {"level": "INFO"},
        "axes": {"level": "WARNING"},
    },
}

# Printed in the footer of every PDF (travelers, packets, WPSs, calculation sheets): the shop's name.
LEGWORK_SHOP_NAME = env_str("LEGWORK_SHOP_NAME", "Legwork")
# Where people reach this Legwork: travelers print QR codes and links to it (no trailing slash needed).
LEGWORK_BASE_URL = env_str("LEGWORK_BASE_URL", "http://127.0.0.1:8000")
# The paper documents print on: empty (the default) follows each record (A4 for SI or ISO jobs and procedures,
# US Letter for the rest); "A4" or "letter" prints everything on that paper (core.pdf.paper_for).
LEGWORK_PAPER_SIZE = env_str("LEGWORK_PAPER_SIZE", "")
# The inspector's queue marks a final visual overdue this many days after the weld was completed (common practice,
# no source: a shop's own target).
LEGWORK_INSPECTION_DUE_DAYS = env_int("LEGWORK_INSPECTION_DUE_DAYS", 2)
