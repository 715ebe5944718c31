"""Who acts in a request, for the history rows that saves write (core.history.actor)."""

from core import history


def acting_user(get_response):
    """Attribute every record saved while answering the request to the signed-in user."""

    def middleware(request):
        with history.acting(lambda: request.user if request.user.is_authenticated else None):
            return get_response(request)

    return middleware
