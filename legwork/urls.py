"""Top-level URLs. Every page needs a login (LoginRequiredMiddleware) except the login page itself."""

from django.contrib import admin
from django.contrib.auth import views as auth_views
from django.urls import include, path

from core import views

urlpatterns = [
    path("", views.home, name="home"),
    path("accounts/login/", views.SignIn.as_view(), name="login"),
    path("accounts/logout/", auth_views.LogoutView.as_view(), name="logout"),
    path("accounts/pauses/", views.lockouts, name="lockouts"),
    path("procedures/", include("procedures.urls")),
    path("inspections/", include("inspections.urls")),
    path("admin/", admin.site.urls),
]

handler400 = "core.views.bad_request"
handler403 = "core.views.forbidden"
handler404 = "core.views.not_found"
handler500 = "core.views.server_error"
